/**
 * Synthetic spectra from a documented physical model, with known answers. Used by the tests, the
 * benchmark (lib/spectra/suite.ts builds the named accuracy suite from it) and the app's demo data.
 *
 * Spectrum model (sample bias V, volts), every term with its physical origin:
 *   dI/dV(V) = clip( offset + A · B(V) · T(V) · [(w_v D_v + w_c D_c + D_in) ∗ K](V)
 *                    + P(V) + W(V) + S(V) + noise + glitches )
 *   D_c(E) = (E − m)·H(E − E_c), D_v(E) = (m − E)·H(E_v − E): the massive 2D Dirac density of states,
 *            a step of height Δ/2 at each band edge followed by a linear rise (m = (E_v + E_c)/2).
 *   w_v, w_c  `onsets`: relative strength of the two onsets. Real spectra are asymmetric: the tip's
 *            density of states and the bias-dependent transmission favour one band, and the valence
 *            onset is often 5–10× weaker than the conduction onset.
 *   D_in(E) = L + v·|E − m|  `inGap`: density inside the gap. L is flat (1D helical edge states of a
 *            topological insulator, defects); v gives a V-shaped (Dirac-like) minimum (edge-state
 *            cone, disorder-broadened band tails). Both continue outside the gap, as real states do.
 *   K      = thermal kernel −∂f/∂E at T ⊗ first-harmonic lock-in kernel for V_peak = √2·V_rms
 *            (resolution.ts; evaluated in closed form through the kernel's running moments).
 *   B(V)   = 1 + b₁V + b₂V² `background`: a smooth, multiplicative tunnelling background (the tip
 *            density of states), applied after broadening (it varies little across one kernel width).
 *   T(V)   = exp(V / V_t) `transmission_V`: the bias dependence of the barrier transmission (higher
 *            at positive sample bias, when electrons tunnel into the sample at a lower barrier).
 *   P(V)   = p₀ + p₁V + p₂V² `additive`: a background added to dI/dV whatever the sample's states,
 *            from the tip's own states, a setpoint effect (the tip height set at one bias weights the
 *            whole curve), lock-in phase leakage of the capacitive current (∝ ω C, often linear in V).
 *            This is the term that makes the in-gap floor slope or curve.
 *   W(V)   `drift`: slow baseline wander during the sweep (thermal drift of the tip height, lock-in
 *            offset drift): a sum of three sinusoids whose periods are 0.4–1.5× the sweep range, with
 *            seeded phases, amplitude `drift.amplitude` (root-mean-square).
 *   S(V)   `tipStep`: a tip change during the sweep, a step of relative size `tipStep.relative` in the
 *            whole signal from bias `tipStep.at_V` on (an atom picked up or lost changes the
 *            transmission at once).
 *   noise  `noise` (σ of the marginal distribution, dI/dV units) of kind `noiseKind`: "white"
 *            (amplifier and shot noise after the lock-in's time constant), "ar1" (a lock-in time
 *            constant comparable to the dwell time per point correlates neighbours: xᵢ = ρxᵢ₋₁ +
 *            √(1−ρ²)σεᵢ), "pink" (1/f noise of the tunnel junction and the feedback, by spectral
 *            synthesis: white noise shaped by 1/√f in the Fourier domain with fft.js, scaled to σ).
 *   glitches `glitches`: single-point spikes (electronics, a tip vibration), ± `glitchSize` × σ.
 *   clip   `clipAt`: the signal saturates at this fraction of its maximum (lock-in sensitivity or
 *            amplifier range set too low), flat-topped.
 * The "truth" is the unbroadened band edges E_v, E_c; a `metal` model has no gap (truth gap null).
 *
 * Field sweep model: setpoint currents log-spaced at one setpoint bias give distances and fields through
 * distance.ts / field.ts, and the gap follows the buckled-honeycomb form Δ(E) = 2|λ − ℓ·e·E|
 * (M. Ezawa, New J. Phys. 14, 033003 (2012); form from memory), closing at E_c = λ/ℓ, with an optional
 * different slope above E_c and a linear midgap shift with field.
 */
import FFT from "fft.js";
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
  /** Relative onset strengths w_v, w_c. Default 1 and 1. */
  onsets?: { vb?: number; cb?: number };
  /** In-gap density: flat level L (per V of |E − m| units, i.e. × A) and V-shape slope v (× A). Default 0. */
  inGap?: { level?: number; vSlope?: number };
  /** Transmission scale V_t of T(V) = exp(V / V_t), V; null or absent = no transmission term. */
  transmission_V?: number | null;
  /** Additive background p₀ + p₁V + p₂V² in dI/dV units. Default 0. */
  additive?: { constant?: number; linear?: number; quadratic?: number };
  /** Slow baseline wander, rms amplitude in dI/dV units. Default none. */
  drift?: { amplitude: number };
  /** A tip change during the sweep: the signal × (1 + relative) from at_V on. Default none. */
  tipStep?: { at_V: number; relative: number };
  /** Noise kind. Default "white". */
  noiseKind?: "white" | "ar1" | "pink";
  /** Lag-1 correlation of "ar1" noise. Default 0.7. */
  rho?: number;
  /** Number of single-point glitches and their size in σ (sign random). Defaults 0 and 20. */
  glitches?: number;
  glitchSize?: number;
  /** Saturation at this fraction of the clean signal's maximum. Default none. */
  clipAt?: number;
  /** A metal: no gap (the band terms are replaced by L + v·|E − m| with the inGap values, L default 1). */
  metal?: boolean;
}

export interface SyntheticSpectrum {
  bias_V: Float64Array;
  didv: Float64Array;
  /** Current, A: ∫ dI/dV from 0 V, scaled to the setpoint current at the setpoint bias. */
  current_A: Float64Array;
  meta: SpectrumMeta;
  truth: { vbEdge_V: number; cbEdge_V: number; gap_eV: number; midgap_V: number; resolution_mV: number; metal?: boolean };
  /** Indices where glitches were put, and the bias range that is clipped (if any). */
  defects?: { glitchAt: number[]; clipped: number };
}

/**
 * The noise-free model dI/dV at the given biases: offset + A·B·T·[(w_v D_v + w_c D_c + D_in) ∗ K] + P
 * (drift, tip steps, noise, glitches and clipping are added by makeSpectrum).
 */
export function modelDidv(bias_V: ArrayLike<number>, m: SpectrumModel): Float64Array {
  const T = m.T_K ?? 4.5;
  const vrms = m.vrms_mV ?? 2;
  const A = m.amplitude ?? 10;
  const b1 = m.background?.linear ?? 0.3;
  const b2 = m.background?.quadratic ?? 1;
  const off = m.offset ?? 0;
  if (!(m.cbEdge_V >= m.vbEdge_V)) throw new RangeError("the conduction-band edge must not lie below the valence-band edge");
  const half = (m.cbEdge_V - m.vbEdge_V) / 2;
  const mid = (m.cbEdge_V + m.vbEdge_V) / 2;
  const wv = m.metal ? 0 : (m.onsets?.vb ?? 1);
  const wc = m.metal ? 0 : (m.onsets?.cb ?? 1);
  const L = m.inGap?.level ?? (m.metal ? 1 : 0);
  const vSlope = m.inGap?.vSlope ?? 0;
  const Vt = m.transmission_V ?? null;
  const p0 = m.additive?.constant ?? 0;
  const p1 = m.additive?.linear ?? 0;
  const p2 = m.additive?.quadratic ?? 0;
  const kern = broadeningKernel(T, vrms);
  const o = new Float64Array(3);
  const out = new Float64Array(bias_V.length);
  for (let i = 0; i < bias_V.length; i++) {
    const v = bias_V[i];
    let d = L;
    convolvedOnset(kern, v - m.cbEdge_V, o);
    d += wc * (half * o[0] + o[1]);
    convolvedOnset(kern, m.vbEdge_V - v, o);
    d += wv * (half * o[0] + o[1]);
    if (vSlope !== 0) {
      // K ∗ |E − m| = K ∗ [(E − m)H(E − m)] + K ∗ [(m − E)H(m − E)]
      convolvedOnset(kern, v - mid, o);
      d += vSlope * o[1];
      convolvedOnset(kern, mid - v, o);
      d += vSlope * o[1];
    }
    const trans = Vt === null ? 1 : Math.exp(v / Vt);
    out[i] = off + A * (1 + b1 * v + b2 * v * v) * trans * d + p0 + p1 * v + p2 * v * v;
  }
  return out;
}

/**
 * Seeded noise of one kind with marginal σ: white, AR(1) with lag-1 correlation ρ, or 1/f ("pink",
 * spectral synthesis: white Gaussian noise in the Fourier domain times 1/√f, transformed back with
 * fft.js and scaled to σ; the mean is removed).
 */
export function makeNoise(n: number, sigma: number, kind: "white" | "ar1" | "pink", seed: number, rho = 0.7): Float64Array {
  const rng = makeRng(seed);
  const out = new Float64Array(n);
  if (kind === "white" || sigma === 0) {
    for (let i = 0; i < n; i++) out[i] = sigma * rng.normal();
    return out;
  }
  if (kind === "ar1") {
    if (!(Math.abs(rho) < 1)) throw new RangeError("AR(1) correlation must lie strictly between −1 and 1");
    const innov = Math.sqrt(1 - rho * rho);
    let x = rng.normal();
    for (let i = 0; i < n; i++) {
      out[i] = sigma * x;
      x = rho * x + innov * rng.normal();
    }
    return out;
  }
  let size = 2;
  while (size < 2 * n) size *= 2;
  const fft = new FFT(size);
  const spec = fft.createComplexArray() as number[];
  for (let k = 1; k < size / 2; k++) {
    const a = 1 / Math.sqrt(k);
    const re = a * rng.normal();
    const im = a * rng.normal();
    spec[2 * k] = re;
    spec[2 * k + 1] = im;
    spec[2 * (size - k)] = re;
    spec[2 * (size - k) + 1] = -im;
  }
  const time = fft.createComplexArray() as number[];
  fft.inverseTransform(time, spec);
  let mean = 0;
  for (let i = 0; i < n; i++) mean += time[2 * i];
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (time[2 * i] - mean) ** 2;
  const scale = sigma / Math.sqrt(ss / n || 1);
  for (let i = 0; i < n; i++) out[i] = (time[2 * i] - mean) * scale;
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
  const model = modelDidv(bias, m);
  const seed = m.seed ?? 1;
  const rng = makeRng(seed);
  const sigma = m.noise ?? 0.02;
  // The slow terms (drift, a tip step) belong to the "clean" signal the current integrates.
  const clean = Float64Array.from(model);
  if (m.tipStep) for (let i = 0; i < n; i++) if (bias[i] >= m.tipStep.at_V) clean[i] *= 1 + m.tipStep.relative;
  if (m.drift && m.drift.amplitude > 0) {
    const span = hi - lo;
    const drng = makeRng(seed * 7919 + 17);
    const terms = [0, 1, 2].map(() => ({ period: span * (0.4 + 1.1 * drng.uniform()), phase: 2 * Math.PI * drng.uniform() }));
    // Three unit sinusoids have rms √(3/2): scale to the requested rms.
    const a = m.drift.amplitude / Math.sqrt(1.5);
    for (let i = 0; i < n; i++) for (const t of terms) clean[i] += a * Math.sin((2 * Math.PI * (bias[i] - lo)) / t.period + t.phase);
  }
  const kind = m.noiseKind ?? "white";
  const didv = new Float64Array(n);
  if (kind === "white") for (let i = 0; i < n; i++) didv[i] = clean[i] + sigma * rng.normal();
  else {
    const nz = makeNoise(n, sigma, kind, seed, m.rho ?? 0.7);
    for (let i = 0; i < n; i++) didv[i] = clean[i] + nz[i];
  }
  const glitchAt: number[] = [];
  if (m.glitches) {
    const grng = makeRng(seed * 104729 + 3);
    for (let g = 0; g < m.glitches; g++) {
      const i = 2 + Math.floor(grng.uniform() * (n - 4));
      didv[i] += (grng.uniform() < 0.5 ? -1 : 1) * (m.glitchSize ?? 20) * sigma;
      glitchAt.push(i);
    }
  }
  let clipped = 0;
  if (m.clipAt !== undefined) {
    let top = -Infinity;
    for (let i = 0; i < n; i++) top = Math.max(top, model[i]);
    const cap = m.clipAt * top;
    for (let i = 0; i < n; i++)
      if (didv[i] > cap) {
        didv[i] = cap;
        clipped++;
      }
  }
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
      ...(m.metal ? { metal: true } : {}),
    },
    defects: { glitchAt, clipped },
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

/**
 * Repeats of one spectrum at one point with independent noise (seeds seed·100 + k). A tip change after
 * repeat `tipChange.after` (1-based count of repeats before it) shifts both edges by `edgeShift_V`
 * (tip-induced band bending changes with the tip's work function) and scales the signal by
 * `amplitudeFactor` (a new apex transmits differently); the truth of each repeat follows.
 */
export function makeRepeats(
  m: SpectrumModel,
  count: number,
  tipChange?: { after: number; edgeShift_V: number; amplitudeFactor: number },
): SyntheticSpectrum[] {
  const out: SyntheticSpectrum[] = [];
  for (let k = 0; k < count; k++) {
    const changed = tipChange !== undefined && k >= tipChange.after;
    const shift = changed ? tipChange.edgeShift_V : 0;
    out.push(
      makeSpectrum({
        ...m,
        vbEdge_V: m.vbEdge_V + shift,
        cbEdge_V: m.cbEdge_V + shift,
        amplitude: (m.amplitude ?? 10) * (changed ? tipChange.amplitudeFactor : 1),
        seed: (m.seed ?? 1) * 100 + k,
      }),
    );
  }
  return out;
}
