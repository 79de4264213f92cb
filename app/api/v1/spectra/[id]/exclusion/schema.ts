/** Body of PUT /api/v1/spectra/{id}/exclusion: `{ excluded, reason, version }`. */
export { excludeInput as exclusionBody } from "@/lib/schemas/picks";
