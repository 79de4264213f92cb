/** Body of POST /api/v1/spectra/{id}/average/put-back: `{ memberId }`, a repeat the test left out. */
export { putBackMemberInput as putBackMemberBody } from "@/lib/schemas/uploads";
