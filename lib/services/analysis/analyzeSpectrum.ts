import type { Spectrum } from "@/db/schema";
import { estimateField, type FieldModel, type GapPick, type SpectrumMeta } from "@/lib/spectra";

export interface FieldValues {
  distanceNm: number | null;
  distanceSigmaNm: number | null;
  fieldVPerNm: number | null;
  fieldSigmaVPerNm: number | null;
  warning?: string;
}

/** Distance and field for one spectrum's setpoint; missing setpoints give nulls and a warning, never an error. */
export function fieldFor(model: FieldModel, meta: Pick<SpectrumMeta, "setpoint_bias_V" | "setpoint_current_A" | "z_offset_pm">): FieldValues {
  if (meta.setpoint_bias_V == null || meta.setpoint_current_A == null) {
    return { distanceNm: null, distanceSigmaNm: null, fieldVPerNm: null, fieldSigmaVPerNm: null, warning: "No setpoint bias and current: no distance or field estimate." };
  }
  try {
    const f = estimateField(model, meta);
    return { distanceNm: f.distance_nm, distanceSigmaNm: f.distanceSigma_nm, fieldVPerNm: f.field_V_per_nm, fieldSigmaVPerNm: f.fieldSigma_V_per_nm };
  } catch (e) {
    return { distanceNm: null, distanceSigmaNm: null, fieldVPerNm: null, fieldSigmaVPerNm: null, warning: `No field estimate: ${(e as Error).message}` };
  }
}

/**
 * The stored columns of an automatic pick (the full pick, minus its arrays, is kept as `auto_pick`),
 * its quality flags in a column of their own so that tables and the fit can filter on them.
 */
export function pickColumns(pick: GapPick, settingsVersionId: string) {
  const { smoothed: _arrays, ...rest } = pick;
  return {
    source: "auto" as const,
    status: pick.status,
    vbEdgeV: pick.vbEdge_V,
    cbEdgeV: pick.cbEdge_V,
    gapEv: pick.gap_eV,
    midgapV: pick.midgap_V,
    uncertaintyEv: pick.uncertainty_eV,
    closed: pick.closed,
    resolutionMev: pick.resolution_meV,
    method: pick.method,
    settingsVersionId,
    flags: pick.flags,
    autoPick: rest as unknown as Record<string, unknown>,
  };
}


/** The analysis metadata of a stored spectrum; its session's temperature stands in when the file had none. */
export function metaOfRow(s: Pick<Spectrum, "setpointBiasV" | "setpointCurrentA" | "zOffsetPm" | "lockinModulationMvRms" | "temperatureK">, sessionTemperatureK: number | null | undefined): Partial<SpectrumMeta> {
  return {
    setpoint_bias_V: s.setpointBiasV ?? undefined,
    setpoint_current_A: s.setpointCurrentA ?? undefined,
    z_offset_pm: s.zOffsetPm ?? undefined,
    lockin_modulation_mV_rms: s.lockinModulationMvRms ?? undefined,
    temperature_K: s.temperatureK ?? sessionTemperatureK ?? undefined,
  };
}
