/**
 * Band-edge extraction from one dI/dV spectrum ("gap pick").
 *
 * 0. Isolated single-point spikes are replaced (despike, with a warning).
 * 1. Resolution from the metadata (resolution.ts): thermal ⊕ lock-in FWHM.
 * 2. Smoothing (settings.smoothing; window follows the resolution by default).
 * 3. Robust floor and σ in the quiet region (noise.ts).
 * 4. Threshold edges: the smoothed signal leaves floor + k·σ_smoothed for N consecutive points,
 *    interpolated (threshold.ts); the threshold-sensitivity (k ± 1) is kept for the uncertainty.
 * 5. Log-scale cross-check (onset line in ln(dI/dV − floor) meets the noise level).
 * 6. Broadening-aware fit of each edge to the raw data (fit.ts), recovering the unbroadened edges.
 * 7. Uncertainty per edge: fit (or threshold-sensitivity) error ⊕ sampling step/√12 ⊕ a model term
 *    (0.05 × resolution after the fit, 0.5 × resolution for threshold edges). For jointly fitted edges
 *    the gap's uncertainty is at least its profile-likelihood σ (fit.ts).
 * A spectrum whose floor is a large fraction of its signal (metallic) or that has no edge on one side
 * is "no-gap". A gap is flagged `closed` ("closed within resolution") when it is below the resolution
 * or when, for close edges fitted jointly, a zero gap fits the data as well (Δχ² below the 95% point
 * of χ² with 2 degrees of freedom, 5.99); then the
 * uncertainty is widened so that the 95% range reaches zero.
 * Bias is the sample bias: positive bias probes empty states, so the conduction band is at V > 0 side.
 */
import { broadeningKernel, energyResolution_mV } from "../resolution";
import { type ExtractionSettings, resolveExtractionSettings, type DeepPartial } from "../settings";
import { smoothSpectrum } from "../smooth/apply";
import { madSigma, quantile } from "../stats";
import { oddWindow } from "../smooth/apply";
import { savgolFilter } from "../smooth/savgol";
import { type Baseline, baselineAt, fitBaselineOn, trimOnsets } from "./baseline";
import { fitEdges } from "./fit";
import { noiseFloor } from "./noise";
import { logOnset, thresholdEdgeDown, thresholdEdgeUp } from "./threshold";
import type { SpectrumMeta } from "../import/types";
import type { QualityFlag } from "./flags";

export interface GapPick {
  status: "ok" | "no-gap";
  vbEdge_V: number | null;
  cbEdge_V: number | null;
  gap_eV: number | null;
  midgap_V: number | null;
  uncertainty_eV: number | null;
  vbSigma_V: number | null;
  cbSigma_V: number | null;
  /** Gap below the energy resolution: report as "closed within resolution". */
  closed: boolean;
  resolution_meV: number;
  noiseFloor: number | null;
  /** σ of the raw data in the quiet region. */
  noiseSigma: number | null;
  threshold: number | null;
  /** "fit" (broadening-aware, separate or joint) or "threshold". */
  method: "fit-separate" | "fit-joint" | "threshold" | "none";
  threshold_edges: { vbEdge_V: number; cbEdge_V: number } | null;
  logCheck: { vbEdge_V: number | null; cbEdge_V: number | null } | null;
  smoothing: string;
  /** The analysed curve after smoothing (sign-inverted if `signInverted`; floor and threshold refer to it). */
  smoothed: Float64Array;
  /** dI/dV was mostly negative and was analysed with its sign inverted. */
  signInverted: boolean;
  warnings: string[];
  /** Reasons the pick may not be trusted (flags.ts); empty when nothing is in doubt. */
  flags: QualityFlag[];
}

export interface PickInput {
  bias_V: ArrayLike<number>;
  didv: ArrayLike<number>;
  meta?: Partial<SpectrumMeta>;
}

function sortedCopy(bias: ArrayLike<number>, y: ArrayLike<number>): { b: Float64Array; v: Float64Array } {
  const n = bias.length;
  let asc = true;
  for (let i = 1; i < n; i++) if (!(bias[i] > bias[i - 1])) { asc = false; break; }
  if (asc) return { b: bias instanceof Float64Array ? bias : Float64Array.from(bias), v: y instanceof Float64Array ? y : Float64Array.from(y) };
  const idx = Array.from({ length: n }, (_, i) => i).sort((a, c) => bias[a] - bias[c]);
  return { b: Float64Array.from(idx, (i) => bias[i]), v: Float64Array.from(idx, (i) => y[i]) };
}

/**
 * Remove isolated single-point spikes (tip or electronics glitches): a point that lies more than 8σ
 * above (or below) both neighbours while the neighbours agree within 4σ is replaced by their mean. σ is
 * the first-difference MAD estimate. A band-edge step is never touched (its neighbours disagree).
 */
export function despike(y: Float64Array): { y: Float64Array; replaced: number; indices: number[] } {
  const n = y.length;
  const indices: number[] = [];
  if (n < 5) return { y, replaced: 0, indices };
  const d = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) d[i - 1] = y[i] - y[i - 1];
  const sigma = madSigma(d) / Math.SQRT2;
  if (!(sigma > 0)) return { y, replaced: 0, indices };
  let out: Float64Array | null = null;
  let replaced = 0;
  for (let i = 1; i < n - 1; i++) {
    const a = y[i] - y[i - 1];
    const b = y[i] - y[i + 1];
    if (a * b > 0 && Math.min(Math.abs(a), Math.abs(b)) > 8 * sigma && Math.abs(y[i + 1] - y[i - 1]) < 4 * sigma) {
      out ??= Float64Array.from(y);
      out[i] = 0.5 * (y[i - 1] + y[i + 1]);
      replaced++;
      indices.push(i);
    }
  }
  return { y: out ?? y, replaced, indices };
}

/**
 * Pick the band edges of one spectrum.
 * @param input bias (V, sample bias), dI/dV (any units), metadata (temperature_K and
 *   lockin_modulation_mV_rms set the resolution; missing values use the settings' assumptions)
 * @param settings extraction settings, partial allowed (defaults: DEFAULT_EXTRACTION_SETTINGS)
 * @throws RangeError for mismatched lengths, fewer than 10 points or non-finite values
 */
export function pickGap(input: PickInput, settings?: DeepPartial<ExtractionSettings> | ExtractionSettings): GapPick {
  const st = resolveExtractionSettings(settings as DeepPartial<ExtractionSettings>);
  const n = input.bias_V.length;
  if (n !== input.didv.length) throw new RangeError("bias and dI/dV must have the same length");
  if (n < 10) throw new RangeError(`a spectrum needs at least 10 points, got ${n}`);
  for (let i = 0; i < n; i++)
    if (!Number.isFinite(input.bias_V[i]) || !Number.isFinite(input.didv[i])) throw new RangeError(`non-finite value at point ${i}`);
  const { b: bias, v: yIn } = sortedCopy(input.bias_V, input.didv);
  const warnings: string[] = [];
  // A lock-in phase set 180° off gives a mostly negative dI/dV: read it with the sign inverted.
  let yPol = yIn;
  let signInverted = false;
  {
    const q05 = quantile(yIn, 0.05);
    const q95 = quantile(yIn, 0.95);
    if (q05 < 0 && -q05 > 3 * Math.max(q95, 0)) {
      yPol = yIn.map((v) => -v);
      signInverted = true;
      warnings.push("dI/dV is mostly negative: sign inverted for the analysis (lock-in phase?)");
    }
  }
  const { y, replaced, indices: spikeAt } = despike(yPol);
  const flags: QualityFlag[] = [];
  if (replaced > 0) {
    warnings.push(`${replaced} single-point spike${replaced > 1 ? "s" : ""} replaced by the mean of the neighbours`);
    const at_V = spikeAt.map((i) => bias[i]);
    flags.push({ code: "glitch", message: `${replaced} single-point spike${replaced > 1 ? "s" : ""} replaced before picking, at ${at_V.map((v) => `${(v * 1000).toFixed(0)} mV`).join(", ")}`, at_V });
  }
  const meta = input.meta ?? {};
  let T = meta.temperature_K;
  if (T === undefined) {
    T = st.assumedTemperature_K;
    warnings.push(`no temperature in the metadata; assumed ${T} K`);
  }
  let vrms = meta.lockin_modulation_mV_rms;
  if (vrms === undefined) {
    vrms = st.assumedLockinModulation_mV_rms;
    warnings.push(`no lock-in modulation in the metadata; assumed ${vrms} mV rms`);
  }
  const res_mV = energyResolution_mV(T, vrms);
  const res_V = res_mV / 1000;
  const step = (bias[n - 1] - bias[0]) / (n - 1);
  {
    let dev = 0;
    for (let i = 1; i < n; i++) dev = Math.max(dev, Math.abs(bias[i] - bias[i - 1] - step));
    if (dev > 0.01 * step) warnings.push("non-uniform bias axis: smoothing assumes uniform steps (importSpectra resamples; do so before picking)");
  }
  const sm = smoothSpectrum(y, step, res_mV, st.smoothing);
  const s = sm.s;
  let lo = 0;
  let hi = n - 1;
  if (st.search.minBias_V !== null) while (lo < n - 1 && bias[lo] < st.search.minBias_V) lo++;
  if (st.search.maxBias_V !== null) while (hi > 0 && bias[hi] > st.search.maxBias_V) hi--;
  const empty = (why: string | null, extra: Partial<GapPick> = {}): GapPick => ({
    status: "no-gap",
    vbEdge_V: null,
    cbEdge_V: null,
    gap_eV: null,
    midgap_V: null,
    uncertainty_eV: null,
    vbSigma_V: null,
    cbSigma_V: null,
    closed: false,
    resolution_meV: res_mV,
    noiseFloor: null,
    noiseSigma: null,
    threshold: null,
    method: "none",
    threshold_edges: null,
    logCheck: null,
    smoothing: sm.description,
    smoothed: s,
    signInverted,
    warnings: why ? [...warnings, why] : warnings,
    flags,
    ...extra,
  });
  if (hi - lo + 1 < 10) return empty("fewer than 10 points inside the search range");
  // Keep the minimum search away from the filter's end effects.
  const margin = Math.min(3, Math.floor((hi - lo) / 4));
  const nf = noiseFloor(y, s, sm.gain, st.threshold.k, lo + margin, hi - margin);
  const top = quantile(s.subarray(lo, hi + 1), 0.95);
  if (!(top > nf.floor) || nf.floor > st.metallicFloorRatio * top)
    return empty("metallic spectrum: no quiet region near zero (no gap)", { noiseFloor: nf.floor, noiseSigma: nf.sigma, threshold: nf.floor + st.threshold.k * nf.sigmaSmoothed });
  // Noise at the smoothing scale, correlated noise included: the smoothed curve about a much wider
  // smoothing of itself (band edges are a few points there, which the MAD ignores).
  const wide = oddWindow(6 * sm.windowPoints * step, step, 7, hi - lo + 1);
  const sW = savgolFilter(s.subarray(lo, hi + 1), wide, 2);
  const dW = new Float64Array(sW.length);
  for (let i = 0; i < sW.length; i++) dW[i] = s[lo + i] - sW[i];
  const sigmaWide = Math.max(madSigma(dW), nf.sigmaSmoothed);
  // A band edge is a sustained rise: a run shorter than this can be a slow noise excursion. Near the
  // end of the search range a shorter run is accepted.
  const Nshort = Math.max(st.threshold.consecutive, sm.windowPoints);
  const Nlong = Math.max(Nshort, Math.round(st.threshold.sustain_mV / 1000 / step), Math.round(3 * res_V / step));
  const walk = (dd: Float64Array, start: number, t: number) => ({
    c: thresholdEdgeUp(bias, dd, start, hi, t, Nlong) ?? thresholdEdgeUp(bias, dd, start, hi, t, Nshort),
    v: thresholdEdgeDown(bias, dd, start, lo, t, Nlong) ?? thresholdEdgeDown(bias, dd, start, lo, t, Nshort),
  });
  // 1. Edges against a flat floor; 2. the gap between them is the quiet region: fit the baseline
  // there, read the edges against it, and repeat until they stay put (edges/baseline.ts).
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) d[i] = s[i] - nf.floor;
  let e = walk(d, nf.iMin, st.threshold.k * sigmaWide);
  const keep = Math.max(1, Math.ceil(res_V / step));
  const base = new Float64Array(n);
  let bl: Baseline | null = null;
  for (let round = 0; round < 5; round++) {
    let from = e.v ? e.v.index + keep : lo + margin;
    let to = e.c ? e.c.index - keep : hi - margin;
    if (to - from < 6) {
      const mid = e.v && e.c ? (e.v.index + e.c.index) >> 1 : nf.iMin;
      from = Math.max(lo, mid - 3);
      to = Math.min(hi, mid + 3);
    }
    if (!e.v || !e.c) {
      // A side without an edge may hold a weak band that the baseline would follow: look for its onset.
      const tr = trimOnsets(bias, y, from, to, Math.min(st.baseline.maxDegree, 1), 0.5 * (bias[from] + bias[to]), nf.sigma, 1, 30);
      from = tr.from;
      to = tr.to;
    }
    bl = fitBaselineOn(bias, y, s, sm.gain, from, to, st.baseline.maxDegree, st.baseline.widthPerDegree_mV / 1000);
    for (let i = 0; i < n; i++) {
      base[i] = baselineAt(bl, bias[i]);
      d[i] = s[i] - base[i];
    }
    const next = walk(d, bl.iMin, st.threshold.k * bl.sigmaSmoothed);
    const same = next.v?.index === e.v?.index && next.c?.index === e.c?.index;
    e = next;
    if (same) break;
  }
  bl = bl!;
  const yd = new Float64Array(n);
  for (let i = 0; i < n; i++) yd[i] = y[i] - base[i];
  const sigS = bl.sigmaSmoothed;
  const thr = base[bl.iMin] + st.threshold.k * sigS;
  const baseInfo = { noiseFloor: base[bl.iMin], noiseSigma: bl.sigma, threshold: thr };
  const edgesAt = (k: number) => walk(d, bl.iMin, k * sigS);
  const main = e;
  (globalThis as any).__pickDebug = { baseline: Array.from(base), thrline: Array.from(base, (b) => b + st.threshold.k * sigS), bl };
  if (!main.c || !main.v) {
    const side = !main.c && !main.v ? "either side" : !main.c ? "the conduction-band side" : "the valence-band side";
    return empty(`no band edge on ${side} within the bias range (no gap)`, baseInfo);
  }
  const kLo = edgesAt(Math.max(1, st.threshold.k - 1));
  const kHi = edgesAt(st.threshold.k + 1);
  const sens = (a: number | undefined, b: number | undefined, fallback: number) => (a !== undefined && b !== undefined ? Math.abs(b - a) / 2 : fallback);
  const vbSens = sens(kLo.v?.edge, kHi.v?.edge, res_V);
  const cbSens = sens(kLo.c?.edge, kHi.c?.edge, res_V);
  const W = Math.max(st.fit.bandWindowPerResolution * res_V, st.fit.minBandWindow_mV / 1000, 8 * step);
  const span = Math.max(4, Math.round(W / step));
  const logV = logOnset(bias, d, main.v.index, -1, span, 0, sigS, lo, hi);
  const logC = logOnset(bias, d, main.c.index, 1, span, 0, sigS, lo, hi);
  let vb = main.v.edge;
  let cb = main.c.edge;
  const sampling = step / Math.sqrt(12);
  let vbSigma = Math.hypot(vbSens, sampling, 0.5 * res_V);
  let cbSigma = Math.hypot(cbSens, sampling, 0.5 * res_V);
  let method: GapPick["method"] = "threshold";
  let consistentWithZero = false;
  let gapSigmaProfile = 0;
  if (st.fit.enabled) {
    const kern = broadeningKernel(T, vrms);
    const f = fitEdges({ bias, y: yd, kernel: kern, vbGuess: vb, cbGuess: cb, sigma: bl.sigma, resolution_V: res_V, step_V: step, bandWindow_V: W, lo, hi });
    if (f && Number.isFinite(f.vb) && Number.isFinite(f.cb) && f.cb >= f.vb) {
      vb = f.vb;
      cb = f.cb;
      const fs = (x: number) => (Number.isFinite(x) ? x : res_V);
      // Correlated noise: the curvature σ assumes independent points; √τ restores the effective count.
      const infl = Math.sqrt(bl.tau);
      vbSigma = Math.hypot(infl * fs(f.vbSigma), sampling / 4, 0.05 * res_V);
      cbSigma = Math.hypot(infl * fs(f.cbSigma), sampling / 4, 0.05 * res_V);
      method = f.mode === "joint" ? "fit-joint" : "fit-separate";
      // Zero-gap model has two parameters fewer (the gap and one step): χ²₂ 95% quantile 5.991.
      consistentWithZero = f.closedDeltaChi2 !== null && f.closedDeltaChi2 < 5.991464547107979;
      gapSigmaProfile = f.gapSigmaProfile ?? 0;
      warnings.push(...f.warnings);
    } else {
      warnings.push("broadening-aware fit failed; threshold edges reported");
    }
  }
  const gap = Math.max(0, cb - vb);
  let uncertainty = Math.max(Math.hypot(vbSigma, cbSigma), gapSigmaProfile);
  if (consistentWithZero) {
    // A zero gap fits as well (Δχ² < 5.99): widen the error bar so that its 95% range reaches zero.
    uncertainty = Math.max(uncertainty, gap / 1.959963984540054);
    warnings.push("gap consistent with zero at 95% (closed within resolution)");
  }
  return {
    status: "ok",
    vbEdge_V: vb,
    cbEdge_V: cb,
    gap_eV: gap,
    midgap_V: (vb + cb) / 2,
    uncertainty_eV: uncertainty,
    vbSigma_V: vbSigma,
    cbSigma_V: cbSigma,
    closed: gap < res_V || consistentWithZero,
    resolution_meV: res_mV,
    ...baseInfo,
    method,
    threshold_edges: { vbEdge_V: main.v.edge, cbEdge_V: main.c.edge },
    logCheck: { vbEdge_V: logV, cbEdge_V: logC },
    smoothing: sm.description,
    smoothed: s,
    signInverted,
    warnings,
    flags,
  };
}
