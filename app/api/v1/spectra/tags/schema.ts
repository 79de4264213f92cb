/**
 * Body of PATCH /api/v1/spectra/tags: `{ ids: [...], patch: { region?, setpointBias_V?, setpointCurrent_A?,
 * zOffset_pm?, tipId? } }`.
 */
export { tagSpectraInput as tagSpectraBody } from "@/lib/schemas/uploads";
