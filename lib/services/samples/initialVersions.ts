import { DEFAULT_EXTRACTION_SETTINGS, DEFAULT_FIELD_MODEL } from "@/lib/spectra/settings";

/**
 * Version 1 of a new sample's extraction settings and field model, holding the analysis core's
 * defaults (kept in one place, lib/spectra/settings.ts). The field model's work functions are not
 * stored: they come from the sample and from each spectrum's tip. Pure, so the seed can use it.
 */
export function initialVersionRows(labId: string, sampleId: string, userId: string | null) {
  const { contactDistance_nm, contactDistanceSigma_nm, barrierHeight_eV, assumedBarrierSigma_eV, screening } = DEFAULT_FIELD_MODEL;
  return {
    settings: { labId, sampleId, version: 1, settings: { ...DEFAULT_EXTRACTION_SETTINGS } as Record<string, unknown>, note: "defaults", createdBy: userId },
    field: { labId, sampleId, version: 1, model: {
        contactDistance_nm,
        contactDistanceSigma_nm,
        decayConstantSource: "mean-work-function",
        barrierHeight_eV,
        assumedBarrierSigma_eV,
        screening,
      }, note: "defaults", createdBy: userId },
  };
}
