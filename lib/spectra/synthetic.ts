/**
 * Synthetic spectra from a documented physical model, with known answers. Used by the tests, the
 * benchmark and the app's demo data.
 *
 * Spectrum model (sample bias V, volts):
 *   dI/dV(V) = offset + A · B(V) · [D ∗ K](V) + noise
 *   D(E)  = |E − m| for E ≤ E_v or E ≥ E_c, 0 inside the gap (massive 2D Dirac density of states:
 *           a step of height Δ/2 at each band edge followed by a linear rise; m = (E_v + E_c)/2)
 *   K     = thermal kernel −∂f/∂E at T ⊗ first-harmonic lock-in kernel for V_peak = √2·V_rms
 *           (resolution.ts; evaluated in closed form through the kernel's running moments)
 *   B(V)  = 1 + b₁V + b₂V², a smooth tunnelling background applied after broadening (it varies little
 *           across one kernel width)
 *   noise = white Gaussian, σ = `noise` (same units as dI/dV), seeded.
 * The "truth" is the unbroadened edges E_v, E_c.
 *
 * Field sweep model: setpoint currents log-spaced at one setpoint bias give distances and fields through
 * distance.ts / field.ts, and the gap follows the buckled-honeycomb form Δ(E) = 2|λ − ℓ·e·E|
 * (M. Ezawa, New J. Phys. 14, 033003 (2012); form from memory), closing at E_c = λ/ℓ, with an optional
 * different slope above E_c and a linear midgap shift with field.
 */
import { broadeningKernel, convolvedOnset, energyResolution_mV } from "./resolution";
import { makeRng } from "./random";
import { estimateField } from "./field";
import { resolveFieldModel, type FieldModel } from "./settings";
import type { SpectrumMeta } from "./import/types";

export interface SpectrumModel {
  vbEdge_V: number;
  cbEdge_V: number;
  /** Temperature, K. Default 4.5. */
  T_K?: number;
  /** Lock-in modulation, mV rms. Default 2. */
  vrms_mV?: number;
  /** Noise σ in dI/dV units. Default 0.02. */
  noise?: number;
  /** Seed of the noise. Default 1. */
  seed?: number;
  /** Bias range and step, V. Defaults: from min(−0.5, E_v − 0.25) to max(0.5, E_c + 0.25), step 2 mV. */
  biasMin_V?: number;
  biasMax_V?: number;
  step_V?: number;
  /** Scale A (dI/dV units per V of |E − m|). Default 10. */
  amplitude?: number;
  /** Constant added to dI/dV (an instrumental offset). Default 0. */
  offset?: number;
  /** Background coefficients b₁ (1/V), b₂ (1/V²). Defaults 0.3 and 1. */
  background?: { linear?: number; quadratic?: number };
  /** Metadata to attach (temperature and modulation are filled in from the model). */
  meta?: Partial<SpectrumMeta>;
  /** Setpoint current used to scale the synthetic current, A. Default 1e-10. */
  setpointCurrent_A?: number;
}

export interface SyntheticSpectrum {
  bias_V: Float64Array;
  didv: Float64Array;
  /** Current, A: ∫ dI/dV from 0 V, scaled to the setpoint current at the setpoint bias. */
  current_A: Float64Array;
  meta: SpectrumMeta;
  truth: { vbEdge_V: number; cbEdge_V: number; gap_eV: number; midgap_V: number; resolution_mV: number };
}

/** The noise-free model dI/dV at the given biases (the D ∗ K term times B, plus offset). */
export function modelDidv(bias_V: ArrayLike<number>, m: SpectrumModel): Float64Array {
  const T = m.T_K ?? 4.5;
  const vrms = m.vrms_mV ?? 2;
  const A = m.amplitude ?? 10;
  const b1 = m.background?.linear ?? 0.3;
  const b2 = m.background?.quadratic ?? 1;
  const off = m.offset ?? 0;
  if (!(m.cbEdge_V >= m.vbEdge_V)) throw new RangeError("the conduction-band edge must not lie below the valence-band edge");
  const half = (m.cbEdge_V - m.vbEdge_V) / 2;
  const kern = broadeningKernel(T, vrms);
  const o = new Float64Array(3);
  const out = new Float64Array(bias_V.length);
  for (let i = 0; i < bias_V.length; i++) {
    const v = bias_V[i];
    convolvedOnset(kern, v - m.cbEdge_V, o);
    let d = half * o[0] + o[1];
    convolvedOnset(kern, m.vbEdge_V - v, o);
    d += half * o[0] + o[1];
    out[i] = off + A * (1 + b1 * v + b2 * v * v) * d;
  }
  return out;
}

export function makeSpectrum(m: SpectrumModel): SyntheticSpectrum {
  const T = m.T_K ?? 4.5;
  const vrms = m.vrms_mV ?? 2;
  const step = m.step_V ?? 0.002;
  const lo = m.biasMin_V ?? Math.min(-0.5, m.vbEdge_V - 0.25);
  const hi = m.biasMax_V ?? Math.max(0.5, m.cbEdge_V + 0.25);
  if (!(step > 0) || !(hi > lo)) throw new RangeError("bias range and step must be positive");
  const n = Math.floor((hi - lo) / step + 1e-9) + 1;
  const bias = new Float64Array(n);
  for (let i = 0; i < n; i++) bias[i] = lo + i * step;
  const clean = modelDidv(bias, m);
  const rng = makeRng(m.seed ?? 1);
  const sigma = m.noise ?? 0.02;
  const didv = new Float64Array(n);
  for (let i = 0; i < n; i++) didv[i] = clean[i] + sigma * rng.normal();
  // Current: cumulative trapezoid of the noise-free dI/dV from 0 V, scaled to the setpoint.
  const cum = new Float64Array(n);
  for (let i = 1; i < n; i++) cum[i] = cum[i - 1] + 0.5 * (clean[i] + clean[i - 1]) * step;
  let i0 = 0;
  for (let i = 0; i < n; i++) if (Math.abs(bias[i]) < Math.abs(bias[i0])) i0 = i;
  const zero = cum[i0] - clean[i0] * bias[i0];
  const vset = m.meta?.setpoint_bias_V ?? hi;
  const iset = m.setpointCurrent_A ?? m.meta?.setpoint_current_A ?? 1e-10;
  let jset = 0;
  for (let i = 0; i < n; i++) if (Math.abs(bias[i] - vset) < Math.abs(bias[jset] - vset)) jset = i;
  const scale = iset / (cum[jset] - zero || 1);
  const current = new Float64Array(n);
  for (let i = 0; i < n; i++) current[i] = (cum[i] - zero) * scale;
  const meta: SpectrumMeta = {
    setpoint_bias_V: vset,
    setpoint_current_A: iset,
    ...m.meta,
    temperature_K: T,
    lockin_modulation_mV_rms: vrms,
    extra: { ...(m.meta?.extra ?? {}) },
  };
  return {
    bias_V: bias,
    didv,
    current_A: current,
    meta,
    truth: {
      vbEdge_V: m.vbEdge_V,
      cbEdge_V: m.cbEdge_V,
      gap_eV: m.cbEdge_V - m.vbEdge_V,
      midgap_V: (m.vbEdge_V + m.cbEdge_V) / 2,
      resolution_mV: energyResolution_mV(T, vrms),
    },
  };
}

export interface SweepModel {
  /** Field model used to turn setpoints into distance and field (defaults: DEFAULT_FIELD_MODEL). */
  fieldModel?: Partial<FieldModel>;
  setpointBias_V?: number;
  /** Setpoint currents, log-spaced from currentMin_A to currentMax_A. Defaults 20 pA … 3 nA. */
  currentMin_A?: number;
  currentMax_A?: number;
  /** Number of spectra. Default 20. */
  n?: number;
  /** Critical field E_c, V/nm. Default 0.98. */
  criticalField_V_per_nm?: number;
  /** |dΔ/dE| below E_c, eV per V/nm (= 2ℓ·e). Default 1.1. */
  slope_eV_per_V_per_nm?: number;
  /** Slope above E_c relative to below. Default 1. */
  slopeRatio?: number;
  /** Midgap at zero field, V, and its shift per V/nm. Defaults 0.01 and 0. */
  midgap0_V?: number;
  midgapShift_V_per_V_per_nm?: number;
  T_K?: number;
  vrms_mV?: number;
  noise?: number;
  seed?: number;
  step_V?: number;
  biasMin_V?: number;
  biasMax_V?: number;
}

export interface SyntheticSweepPoint extends SyntheticSpectrum {
  truthField: { distance_nm: number; field_V_per_nm: number; gap_eV: number };
}

/** Gap of the sweep model at field E (V/nm), eV. */
export function sweepGap_eV(E: number, m: SweepModel): number {
  const ec = m.criticalField_V_per_nm ?? 0.98;
  const a = m.slope_eV_per_V_per_nm ?? 1.1;
  const r = m.slopeRatio ?? 1;
  return E < ec ? a * (ec - E) : a * r * (E - ec);
}

export function makeSweep(m: SweepModel = {}): { spectra: SyntheticSweepPoint[]; fieldModel: FieldModel; truth: { criticalField_V_per_nm: number } } {
  const fm = resolveFieldModel(m.fieldModel ?? { tipWorkFunction_eV: 4.7, sampleWorkFunction_eV: 3.9 });
  const n = m.n ?? 20;
  const vset = m.setpointBias_V ?? 0.6;
  const ilo = m.currentMin_A ?? 2e-11;
  const ihi = m.currentMax_A ?? 3e-9;
  const spectra: SyntheticSweepPoint[] = [];
  for (let k = 0; k < n; k++) {
    const iset = n === 1 ? ilo : ilo * Math.pow(ihi / ilo, k / (n - 1));
    const meta = { setpoint_bias_V: vset, setpoint_current_A: iset, z_offset_pm: 0 };
    const f = estimateField(fm, meta);
    const gap = sweepGap_eV(f.field_V_per_nm, m);
    const mid = (m.midgap0_V ?? 0.01) + (m.midgapShift_V_per_V_per_nm ?? 0) * f.field_V_per_nm;
    const s = makeSpectrum({
      vbEdge_V: mid - gap / 2,
      cbEdge_V: mid + gap / 2,
      T_K: m.T_K ?? 4.5,
      vrms_mV: m.vrms_mV ?? 3,
      noise: m.noise ?? 0.02,
      seed: (m.seed ?? 7) * 1000 + k,
      step_V: m.step_V ?? 0.002,
      biasMin_V: m.biasMin_V ?? -0.5,
      biasMax_V: m.biasMax_V ?? 0.5,
      meta: { ...meta, extra: {} },
      setpointCurrent_A: iset,
    });
    spectra.push({ ...s, truthField: { distance_nm: f.distance_nm, field_V_per_nm: f.field_V_per_nm, gap_eV: gap } });
  }
  return { spectra, fieldModel: fm, truth: { criticalField_V_per_nm: m.criticalField_V_per_nm ?? 0.98 } };
}
