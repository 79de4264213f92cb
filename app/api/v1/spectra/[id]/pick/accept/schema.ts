/** Body of POST /api/v1/spectra/{id}/pick/accept: `{ version }`, the pick version the analyst accepts. */
export { acceptInput as acceptBody } from "@/lib/schemas/picks";
