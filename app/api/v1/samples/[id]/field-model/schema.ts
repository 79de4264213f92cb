/**
 * Body of PUT /api/v1/samples/{id}/field-model: `{ contactDistance_nm, contactDistanceSigma_nm?, decayConstantSource?,
 * barrierHeight_eV?, curveScope?, curveSessionId?, curveTipId?, curveIds?, screening?, note? }`
 * (decayConstantSource "curves": κ from the sample's I(z) curves of one session, one tip or a set).
 */
export { fieldModelInput as fieldModelBody } from "@/lib/schemas/uploads";
