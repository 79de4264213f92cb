/** Body of POST /api/v1/spectra/average: `{ ids: [...], include?: [...] }` (repeats at one point, in order). */
export { averageSpectraInput as averageSpectraBody } from "@/lib/schemas/uploads";
