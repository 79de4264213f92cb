/**
 * Body of PUT /api/v1/samples/{id}/field-model: `{ contactDistance_nm, contactDistanceSigma_nm?, decayConstantSource?,
 * barrierHeight_eV?, screening?, note? }`.
 */
export { fieldModelInput as fieldModelBody } from "@/lib/schemas/uploads";
