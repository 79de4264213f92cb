import type { Spectrum } from "@/db/schema";
import {
  compareRepeats,
  estimateField,
  pickGap,
  pickOnView,
  PrepareError,
  repeatGroups,
  type ExtractionSettings,
  type FieldModel,
  type GapPick,
  type PickInput,
  type QualityFlag,
  type SpectrumMeta,
} from "@/lib/spectra";

export interface FieldValues {
  distanceNm: number | null;
  distanceSigmaNm: number | null;
  fieldVPerNm: number | null;
  fieldSigmaVPerNm: number | null;
  warning?: string;
}

/** The view a pick was made on, as the pick records it (`auto_pick.view`). */
export interface PickView {
  method: "none" | "feenstra" | "setpoint";
  description: string;
  currentReconstructed: boolean;
}

/**
 * The pick on the view the settings name (raw, Feenstra- or setpoint-normalised). A spectrum that
 * cannot be normalised so (no setpoint, a range without 0 V) is picked on its raw dI/dV, and the
 * pick's first warning says why; the view it was made on is returned either way.
 */
export function pickOnSettingsView(
  spectrum: PickInput & { current_A?: Float64Array | null },
  settings: ExtractionSettings,
): { pick: GapPick; view: PickView } {
  try {
    const { pick, view } = pickOnView(spectrum, settings);
    return { pick, view: { method: view.method, description: view.description, currentReconstructed: view.currentReconstructed } };
  } catch (e) {
    if (!(e instanceof PrepareError)) throw e;
    const pick = pickGap(spectrum, settings);
    pick.warnings.unshift(`not normalised (${settings.normalisation.method}): ${e.message}; picked on raw dI/dV`);
    return { pick, view: { method: "none", description: "raw dI/dV", currentReconstructed: false } };
  }
}

/**
 * The analysis of one spectrum with its sample's current versions, the same step for upload
 * processing and re-analysis: the automatic pick with the extraction settings (on the view they
 * name), and the distance and field with the field model of the spectrum's tip. A file without a
 * temperature takes its session's. Pure: what it returns is stored by the caller.
 */
export function analyzeSpectrum<M extends Partial<SpectrumMeta>>(
  spectrum: PickInput & { meta: M; current_A?: Float64Array | null },
  how: { settings: ExtractionSettings; model: FieldModel; sessionTemperatureK?: number | null },
): { meta: M; pick: GapPick; view: PickView; field: FieldValues } {
  const meta = { ...spectrum.meta, temperature_K: spectrum.meta.temperature_K ?? how.sessionTemperatureK ?? undefined };
  const { pick, view } = pickOnSettingsView({ bias_V: spectrum.bias_V, didv: spectrum.didv, current_A: spectrum.current_A, meta }, how.settings);
  return { meta, pick, view, field: fieldFor(how.model, meta) };
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
 * The stored columns of an automatic pick (the full pick, minus its arrays, is kept as `auto_pick`,
 * with the view it was made on), its quality flags in a column of their own so that tables and the
 * fit can filter on them.
 */
export function pickColumns(pick: GapPick, settingsVersionId: string, view?: PickView) {
  const { smoothed: _smoothed, baseline: _baseline, ...own } = pick;
  const rest = view ? { ...own, view } : own;
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
export function metaOfRow(s: Pick<Spectrum, "setpointBiasV" | "setpointCurrentA" | "zOffsetPm" | "lockinModulationMvRms" | "temperatureK">, sessionTemperatureK?: number | null): Partial<SpectrumMeta> {
  return {
    setpoint_bias_V: s.setpointBiasV ?? undefined,
    setpoint_current_A: s.setpointCurrentA ?? undefined,
    z_offset_pm: s.zOffsetPm ?? undefined,
    lockin_modulation_mV_rms: s.lockinModulationMvRms ?? undefined,
    temperature_K: s.temperatureK ?? sessionTemperatureK ?? undefined,
  };
}

/** One spectrum as the repeat check needs it: its file, metadata, arrays and automatic pick. */
export interface RepeatCandidate {
  /** Spectra are repeats only within one file (an upload's entry). */
  file: string;
  meta: Pick<SpectrumMeta, "x_nm" | "y_nm" | "setpoint_bias_V" | "setpoint_current_A" | "extra">;
  bias_V: ArrayLike<number>;
  didv: ArrayLike<number>;
  pick: Pick<GapPick, "status" | "vbEdge_V" | "cbEdge_V" | "vbSigma_V" | "cbSigma_V" | "noiseSigma" | "signInverted">;
}

/**
 * Tip-change and drift flags for repeats at one point (lib/spectra `repeatGroups`, `compareRepeats`):
 * for each candidate, the flags to add (empty when it is no repeat or agrees with its repeats).
 */
export function repeatFlags(items: RepeatCandidate[]): QualityFlag[][] {
  const out: QualityFlag[][] = items.map(() => []);
  const byFile = new Map<string, number[]>();
  items.forEach((it, i) => byFile.set(it.file, [...(byFile.get(it.file) ?? []), i]));
  for (const idx of byFile.values())
    for (const group of repeatGroups(idx.map((i) => items[i].meta))) {
      const members = group.map((g) => idx[g]);
      const flags = compareRepeats(members.map((i) => ({ bias_V: items[i].bias_V, didv: items[i].didv, pick: items[i].pick, label: `repeat ${members.indexOf(i) + 1}` })));
      members.forEach((i, k) => out[i].push(...flags[k]));
    }
  return out;
}
