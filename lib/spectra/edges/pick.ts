/**
 * Band-edge extraction from one dI/dV spectrum ("gap pick"). The promise: every number returned is
 * right within twice its uncertainty, or carries a quality flag saying why it may not be (flags.ts).
 * Method, sources and defaults in full: lib/spectra/README.md ("Gap picking").
 *
 * 0. Sign (lock-in phase), single-point spikes replaced (`glitch` flag), saturation (`clipped` flag).
 * 1. Resolution from the metadata (resolution.ts): thermal ⊕ lock-in FWHM.
 * 2. Smoothing (settings.smoothing; window follows the resolution by default).
 * 3. A flat floor and the noise at the smoothing scale for a first look (noise.ts), then the in-gap
 *    baseline and the edges together (baseline.ts): a robust low-order polynomial fitted to the gap
 *    between the current edges, σ and τ (correlation) from its residuals, edges read against it as
 *    sustained rises above k·σ_smoothed, iterated until the edges stay put.
 * 4. V test: a spectrum that is one continuous V (no floor between onsets) is read as a closed or
 *    nearly closed gap, fitted from its vertex.
 * 5. Broadening-aware fit of each edge (fit.ts), recovering the unbroadened edges; weak onsets get the
 *    honest width of their χ² profile as uncertainty (and a `noisy` flag), ambiguous ones an
 *    `unreliable-edge` flag; standard errors carry √τ for correlated noise.
 * 6. `closed` ("closed within resolution") only with evidence: a V, a gap below the resolution or
 *    consistent with zero (simulated Δχ² points), and a 95% bound within five resolutions.
 * A spectrum whose floor is a large fraction of its signal (metallic) or that has no edge on one side
 * is "no-gap". Bias is the sample bias: positive bias probes empty states, so the conduction band is
 * on the V > 0 side.
 */
import { type BroadeningKernel, broadeningKernel, convolvedOnset, energyResolution_mV } from "../resolution";
import { DEFAULT_EXTRACTION_SETTINGS, type ExtractionSettings, resolveExtractionSettings, type DeepPartial } from "../settings";
import { smoothSpectrum } from "../smooth/apply";
import { linearLeastSquares, madSigma, median, movingAverage, quantile } from "../stats";
import { type Baseline, autocorrelationTime, baselineAt, fitBaselineOn, polyFit, trimOnsets } from "./baseline";
import { edgeProfileRange, fitEdges } from "./fit";
import { noiseFloor, quietCurve, quietTilt } from "./noise";
import { logOnset, sustainedEdge } from "./threshold";
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
  /**
   * The in-gap baseline the edges were read against, at each bias point of the (sorted) spectrum: a
   * polynomial of degree `baselineDegree` fitted to the quiet region; `noiseFloor` is its value at the
   * quietest point. The threshold follows it: baseline + `thresholdOffset` (k·σ of the smoothed curve).
   */
  baseline: Float64Array | null;
  baselineDegree: number | null;
  thresholdOffset: number | null;
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

/**
 * Is the spectrum one continuous V (a closed or nearly closed gap, Dirac-like) rather than a floor
 * between two onsets? Fit a + b·V + v·(K ∗ |V − m|) (m scanned, K the broadening kernel) over the threshold gap and a band window on
 * each side; a V explains a V-shaped spectrum to the noise, while a gap's onsets (steps above the V)
 * leave large residuals. Both arms must rise. Judged on three windows (each band window and the middle third of the gap):
 * the largest mean residual in units of its standard error (n_eff = n/τ); with the best m and slope.
 */
function vShapeTest(bias: Float64Array, y: Float64Array, iv: number, ic: number, iMin: number, minExt: number, sigma: number, tau: number, kern: BroadeningKernel): { deviation: number; m: number; v: number; sigma: number; tau: number } | null {
  // Band windows as wide as the gap: a V seen only inside a wider gap (in-gap states) is not one.
  const ext = Math.max(minExt, ic - iv);
  const j0 = Math.max(0, iv - ext);
  const j1 = Math.min(bias.length - 1, ic + ext);
  if (j1 - j0 + 1 < 12 || !(sigma > 0)) return null;
  // A long window is read every k-th point (standard errors still count every point, which makes the
  // test stricter, never looser).
  const k = Math.max(1, Math.ceil((j1 - j0 + 1) / 240));
  const n = Math.floor((j1 - j0) / k) + 1;
  const bs = Float64Array.from({ length: n }, (_, i) => bias[j0 + i * k]);
  const yy = Float64Array.from({ length: n }, (_, i) => y[j0 + i * k]);
  const i0 = 0;
  iv = Math.round((iv - j0) / k);
  ic = Math.round((ic - j0) / k);
  iMin = Math.round((iMin - j0) / k);
  bias = bs;
  const one = new Float64Array(n).fill(1);
  const lin = Float64Array.from({ length: n }, (_, i) => bias[i] - bias[0]);
  const vcol = new Float64Array(n);
  const o3 = new Float64Array(3);
  // Each band window and the middle third of the gap, in three chunks each: a V must explain every
  // chunk (a mean residual over a long window could hide a misfit of the wrong shape).
  const third = Math.floor((ic - iv) / 3);
  const chunks: [number, number][] = [];
  for (const [a, b] of [[0, iv - i0], [ic - i0, n - 1], [iv - i0 + third, ic - i0 - third]]) {
    if (b < a) continue;
    const len = b - a + 1;
    const parts = len >= 12 ? 3 : 1;
    for (let k = 0; k < parts; k++) chunks.push([a + Math.floor((k * len) / parts), a + Math.floor(((k + 1) * len) / parts) - 1]);
  }
  // The vertex lies at the spectrum's minimum, within a sixth of the threshold gap.
  const span = Math.max(1, Math.round((ic - iv) / 6));
  const mFrom = bias[Math.max(iv, iMin - span)];
  const mTo = bias[Math.min(ic, iMin + span)];
  let best: { deviation: number; m: number; v: number; coef: Float64Array; vcol: Float64Array } | null = null;
  for (let t = 0; t <= 8; t++) {
    const m = mFrom + ((mTo - mFrom) * t) / 8;
    // |V − m| broadened by the same kernel as the data (its vertex is rounded over a resolution).
    for (let i = 0; i < n; i++) {
      convolvedOnset(kern, bias[i0 + i] - m, o3);
      vcol[i] = o3[1];
      convolvedOnset(kern, m - bias[i0 + i], o3);
      vcol[i] += o3[1];
    }
    const r = linearLeastSquares([one, lin, vcol], yy);
    // Both arms must rise (slopes v ± b within a factor of 4): one flat arm is a weak onset, not a V.
    if (!r || !(r.coef[2] > 0) || Math.abs(r.coef[1]) > 0.6 * r.coef[2]) continue;
    let worst = 0;
    for (const [a, b] of chunks) {
      let sum = 0;
      for (let i = a; i <= b; i++) sum += yy[i] - (r.coef[0] + r.coef[1] * lin[i] + r.coef[2] * vcol[i]);
      const cnt = b - a + 1;
      worst = Math.max(worst, Math.abs(sum / cnt) / (sigma * Math.sqrt(Math.max(1, tau) / (cnt * k))));
    }
    if (!best || worst < best.deviation) best = { deviation: worst, m, v: r.coef[2], coef: r.coef, vcol: Float64Array.from(vcol) };
  }
  if (!best) return null;
  // The noise about the V itself (the baseline's σ of a V-shaped spectrum holds the V's misfit).
  const res = new Float64Array(n);
  for (let i = 0; i < n; i++) res[i] = yy[i] - (best.coef[0] + best.coef[1] * lin[i] + best.coef[2] * best.vcol[i]);
  const ac = autocorrelationTime(res);
  return { deviation: best.deviation, m: best.m, v: best.v, sigma: madSigma(res), tau: ac.tau };
}

/**
 * Does a baseline fitted to a wider region agree with the narrower region's baseline over that narrower
 * region? The rms difference there must stay within three standard errors of the narrower fit's
 * prediction, σ·√(τ·(degree + 1)/n) (the rms prediction error of a least-squares polynomial over its own
 * points; common practice).
 */
function baselinesAgree(narrow: Baseline, wide: Baseline, bias: Float64Array): boolean {
  const n = narrow.to - narrow.from + 1;
  let ss = 0;
  for (let i = narrow.from; i <= narrow.to; i++) ss += (baselineAt(wide, bias[i]) - baselineAt(narrow, bias[i])) ** 2;
  const se = narrow.sigma * Math.sqrt((narrow.tau * (narrow.degree + 1)) / n);
  return Math.sqrt(ss / n) <= 3 * se;
}

/** Δχ² of the zero-gap model below which a zero gap is not excluded: simulated 95% and 99% points (see pickGap). */
export const ZERO_GAP_DCHI2_95 = 7.0;
export const ZERO_GAP_DCHI2_99 = 9.8;
/** An onset this many noise levels (σ_smoothed·√τ) above the baseline half a band window out is strong. */
const STRONG_ONSET = 15;
/** Below this many noise levels half a band window out, an onset read against a sloped floor is weak. */
const WEAK_ON_SLOPE = 10;
/**
 * A band onset is the sharpest rise near the gap: a rise beyond an edge this many times steeper than the
 * steepest rise at the edge says the edge may sit on a sloped floor inside the gap. Set on the bench suite,
 * where 2 of about 4,000 correctly placed edges exceed it and most edges placed deep inside a gap do.
 */
const SHARPER_RISE = 5;
/** Share of the sustained stretch (threshold.sustain_mV) a band edge spends above the threshold. */
const SUSTAINED_SHARE = 0.9;

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
 * Saturation: at least 3 points exactly at the spectrum's maximum (or minimum), 2 of them adjacent —
 * a real signal never repeats its extreme value to the last digit.
 */
export function clippedRange(bias: Float64Array, y: Float64Array): { from: number; to: number; count: number; top: boolean } | null {
  for (const top of [true, false]) {
    let ext = y[0];
    for (let i = 1; i < y.length; i++) if (top ? y[i] > ext : y[i] < ext) ext = y[i];
    let count = 0;
    let adjacent = false;
    let from = Infinity;
    let to = -Infinity;
    for (let i = 0; i < y.length; i++)
      if (y[i] === ext) {
        count++;
        if (i > 0 && y[i - 1] === ext) adjacent = true;
        from = Math.min(from, bias[i]);
        to = Math.max(to, bias[i]);
      }
    if (count >= 3 && adjacent) return { from, to, count, top };
  }
  return null;
}

/**
 * Pick the band edges of one spectrum.
 * @param input bias (V, sample bias), dI/dV (any units), metadata (temperature_K and
 *   lockin_modulation_mV_rms set the resolution; missing values use the settings' assumptions)
 * @param settings extraction settings, partial allowed (defaults: DEFAULT_EXTRACTION_SETTINGS)
 * @throws RangeError for mismatched lengths, fewer than 10 points or non-finite values
 */
export function pickGap(input: PickInput, settings?: DeepPartial<ExtractionSettings> | ExtractionSettings): GapPick {
  // The defaults are valid as they are: validating them again for every spectrum costs more than a fit.
  const st = settings === undefined ? DEFAULT_EXTRACTION_SETTINGS : resolveExtractionSettings(settings as DeepPartial<ExtractionSettings>);
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
  const clip = clippedRange(bias, yPol);
  if (clip) flags.push({ code: "clipped", message: `The signal sits at its ${clip.top ? "maximum" : "minimum"} over ${clip.count} points between ${(clip.from * 1000).toFixed(0)} and ${(clip.to * 1000).toFixed(0)} mV (saturation: lock-in sensitivity or amplifier range?).`, at_V: [clip.from, clip.to] });
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
    baseline: null,
    baselineDegree: null,
    thresholdOffset: null,
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
  const sLoHi = s.subarray(lo, hi + 1);
  const dW = movingAverage(sLoHi, Math.max(1, Math.floor(Math.min(6 * sm.windowPoints + 1, sLoHi.length) / 2)));
  for (let i = 0; i < dW.length; i++) dW[i] = sLoHi[i] - dW[i];
  const sigmaWide = Math.max(madSigma(dW), nf.sigmaSmoothed);
  // Runs: a few points above the threshold (the smoothing window), within a sustained stretch.
  const Nshort = Math.max(st.threshold.consecutive, sm.windowPoints);
  const Nlong = Math.max(Nshort, Math.round(st.threshold.sustain_mV / 1000 / step), Math.round(3 * res_V / step));
  // A band edge is a sustained rise: from it the signal stays above the threshold for a few points and
  // then spends most of the next stretch above it; a slow noise excursion does not.
  const walk = (dd: Float64Array, start: number, t: number) => ({
    c: sustainedEdge(bias, dd, start, hi, t, Nshort, Nlong, SUSTAINED_SHARE, 1),
    v: sustainedEdge(bias, dd, start, lo, t, Nshort, Nlong, SUSTAINED_SHARE, -1),
  });
  // 1. Edges against a flat floor; 2. the gap between them is the quiet region: fit the baseline
  // there, read the edges against it, and repeat until they stay put (edges/baseline.ts).
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) d[i] = s[i] - nf.floor;
  let e = walk(d, nf.iMin, st.threshold.k * sigmaWide);
  const flatLook = e;
  /** A quiet run under a tilt that was not taken for the first look (an end did not rise as a band does). */
  let straightRun: { from: number; to: number; coef: Float64Array; center: number } | null = null;
  if (st.baseline.tiltedLook) {
    // A tilted floor (a linear background): under the right tilt the gap is one long quiet run. Take the
    // tilt for the first look only when it makes the run half as long again and both ends of the run rise
    // as band onsets do; the baseline fit below then judges the slope on the data. A floor that is curved
    // as well ends the tilted run early: a quadratic grown from it gets the same test.
    const qt = quietTilt(bias, s, top, sigmaWide, st.threshold.k, lo + margin, hi - margin, nf.iMin);
    const Wt = Math.max(4, Math.round(Math.max(st.fit.minBandWindow_mV / 1000, 4 * res_V) / step));
    const long = (a: number, b: number) => b - a + 1 >= 1.5 * qt.flatWidth && bias[b] - bias[a] >= Math.max(8 * res_V, 0.04);
    /** Edges against `floorAt`, if both ends of the quiet run [a, b] rise at least 4k noise levels over a band window. */
    const lookAgainst = (floorAt: (b: number) => number, a: number, b: number) => {
      let iMin = a;
      for (let i = 0; i < n; i++) {
        d[i] = s[i] - floorAt(bias[i]);
        if (i >= a && i <= b && d[i] < d[iMin]) iMin = i;
      }
      const excess = (from: number, dir: 1 | -1) => {
        let sum = 0;
        let cnt = 0;
        for (let j = 1; j <= Wt; j++) {
          const i = from + dir * j;
          if (i < lo || i > hi) break;
          sum += d[i];
          cnt++;
        }
        return cnt ? sum / cnt / sigmaWide : 0;
      };
      const edges = walk(d, iMin, st.threshold.k * sigmaWide);
      return edges.v && edges.c && Math.min(excess(a, -1), excess(b, 1)) >= 4 * st.threshold.k ? edges : null;
    };
    if (qt.slope !== 0 && long(qt.from, qt.to)) {
      const c = 0.5 * (bias[qt.from] + bias[qt.to]);
      const f0 = median(Float64Array.from({ length: qt.to - qt.from + 1 }, (_, j) => y[qt.from + j] - qt.slope * (bias[qt.from + j] - c)));
      const line = { coef: Float64Array.of(f0, qt.slope), center: c };
      let look = lookAgainst((b) => baselineAt(line, b), qt.from, qt.to);
      if (!look) {
        const qc = quietCurve(bias, s, sigmaWide, st.threshold.k, lo + margin, hi - margin, qt.from, qt.to);
        if (qc && long(qc.from, qc.to)) look = lookAgainst((b) => baselineAt(qc, b), qc.from, qc.to);
      }
      if (look) e = look;
      else straightRun = { from: qt.from, to: qt.to, ...line };
    }
  }
  const keep = Math.max(1, Math.ceil(res_V / step));
  const base = new Float64Array(n);
  let bl: Baseline | null = null;
  // Where a weak onset was found inside the region, later regions stop there (a threshold crosses a
  // weak band late, and a region reaching into it would tilt the baseline towards it again).
  let fenceLo = -1;
  let fenceHi = n;
  let trimmed = { vb: false, cb: false };
  let prev: { bl: Baseline; e: typeof e } | null = null;
  for (let round = 0; round < 5; round++) {
    let from = Math.max(e.v ? e.v.index + keep : lo + margin, fenceLo);
    let to = Math.min(e.c ? e.c.index - keep : hi - margin, fenceHi);
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
    if (bl.degree >= 1) {
      // A slope may be a weak onset inside the region (flat, then rising from a kink): test each end.
      const tr = trimOnsets(bias, y, from, to, 1, bl.center, null, 1, 30);
      if (tr.from !== from || tr.to !== to) {
        if (tr.from !== from) fenceLo = tr.from;
        if (tr.to !== to) fenceHi = tr.to;
        trimmed = { vb: trimmed.vb || tr.from !== from, cb: trimmed.cb || tr.to !== to };
        bl = fitBaselineOn(bias, y, s, sm.gain, tr.from, tr.to, st.baseline.maxDegree, st.baseline.widthPerDegree_mV / 1000);
      }
    }
    // A wider region whose baseline disagrees with the narrower one where both hold has grown into a
    // band (a weak onset the threshold crossed late), not along the floor: keep the last edges that agreed.
    const grewIntoBand = prev !== null && prev.bl.degree + bl.degree >= 1 && !baselinesAgree(prev.bl, bl, bias);
    if (grewIntoBand) ({ bl, e } = prev!);
    for (let i = 0; i < n; i++) {
      base[i] = baselineAt(bl, bias[i]);
      d[i] = s[i] - base[i];
    }
    if (grewIntoBand) break;
    const next = walk(d, bl.iMin, st.threshold.k * bl.sigmaSmoothed);
    const same = next.v?.index === e.v?.index && next.c?.index === e.c?.index;
    // An edge lost against the new baseline means that baseline does not hold beyond its region
    // (a polynomial extrapolated): keep the edges that had one.
    if (same || ((!next.v || !next.c) && e.v && e.c)) break;
    prev = { bl, e };
    e = next;
  }
  bl = bl!;
  const yd = new Float64Array(n);
  for (let i = 0; i < n; i++) yd[i] = y[i] - base[i];
  const sigS = bl.sigmaSmoothed;
  const thr = base[bl.iMin] + st.threshold.k * sigS;
  // σ for the fits: the residuals about the baseline, but never below the first-difference estimate,
  // which holds for white noise and does not depend on the quiet region's size (a few points across a
  // narrow gap can give a MAD far too small, and fits that claim far too much).
  const sigmaFit = Math.max(bl.sigma, nf.sigma);
  const baseInfo = { noiseFloor: base[bl.iMin], noiseSigma: sigmaFit, threshold: thr, baseline: base, baselineDegree: bl.degree, thresholdOffset: st.threshold.k * sigS };
  const edgesAt = (k: number) => walk(d, bl.iMin, k * sigS);
  const main = e;
  if (!main.c || !main.v) {
    const side = !main.c && !main.v ? "either side" : !main.c ? "the conduction-band side" : "the valence-band side";
    // One clear edge and none on the other side: a weak onset hidden in a sloped floor, or a band beyond
    // the bias range, cannot be told from no band there. The answer stays "no gap", with a flag saying so.
    const found = main.c ?? main.v;
    if (found) {
      const missing = main.c ? "valence-band" : "conduction-band";
      flags.push({
        code: "unreliable-edge",
        message: `A ${main.c ? "conduction" : "valence"}-band edge rises at ${(found.edge * 1000).toFixed(0)} mV, but no ${missing} edge was found: a weak onset hidden by a sloped floor, or a band beyond the bias range, cannot be told from no band there.`,
        at_V: [found.edge],
      });
    }
    return empty(`no band edge on ${side} within the bias range (no gap)`, baseInfo);
  }
  const kern = broadeningKernel(T, vrms);
  // A floor that stays low over most of the threshold gap is not a V (in a V, (smoothed − baseline)
  // rises across the whole gap): skip the test then.
  let low = 0;
  for (let i = main.v.index; i <= main.c.index; i++) if (d[i] < 0.5 * st.threshold.k * sigS) low++;
  const flatFloor = low > 0.8 * (main.c.index - main.v.index + 1) && main.c.edge - main.v.edge > 8 * res_V;
  const vShape = flatFloor ? null : vShapeTest(bias, y, main.v.index, main.c.index, bl.iMin, Math.max(4, Math.round(st.fit.minBandWindow_mV / 1000 / step)), sigmaFit, bl.tau, kern);
  const isV = vShape !== null && vShape.deviation < st.closed.vShapeMaxDeviation;
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
  let zeroNotExcluded = false;
  let gapSigmaProfile = 0;
  let f_warnings: string[] = [];
  if (st.fit.enabled) {
    // A V-shaped spectrum (one continuous V, no floor between onsets) is fitted as two onsets close to
    // its minimum, on the raw data (the baseline took in part of the V).
    const g = Math.max(res_V, 2 * step);
    const f = isV
      ? fitEdges({ bias, y, kernel: kern, vbGuess: vShape.m - g, cbGuess: vShape.m + g, sigma: vShape.sigma, tau: vShape.tau, resolution_V: res_V, step_V: step, bandWindow_V: W, lo, hi })
      : fitEdges({ bias, y: yd, kernel: kern, vbGuess: vb, cbGuess: cb, sigma: sigmaFit, tau: bl.tau, resolution_V: res_V, step_V: step, bandWindow_V: W, lo, hi });
    if (f && Number.isFinite(f.vb) && Number.isFinite(f.cb) && f.cb >= f.vb) {
      vb = f.vb;
      cb = f.cb;
      const fs = (x: number) => (Number.isFinite(x) ? x : res_V);
      // Correlated noise: the curvature σ assumes independent points; √τ restores the effective count.
      const infl = Math.sqrt(bl.tau);
      vbSigma = Math.hypot(infl * fs(f.vbSigma), sampling / 4, 0.05 * res_V);
      cbSigma = Math.hypot(infl * fs(f.cbSigma), sampling / 4, 0.05 * res_V);
      method = f.mode === "joint" ? "fit-joint" : "fit-separate";
      // Is a zero gap as good? The zero-gap model has two parameters fewer (the gap and one step), but
      // the edges are non-linear and the steps cannot be negative, so Δχ² is not χ²₂ under a zero gap:
      // its quantiles, simulated on 300 zero-gap spectra of our model (1.2–10 K, 1–5 mV rms, 1–4 mV
      // steps, varied noise; tests/unit/spectra/realistic.test.ts repeats a smaller run), are 7.0 at
      // 95% and 9.8 at 99% (χ²₂: 5.99 and 9.21).
      consistentWithZero = f.closedDeltaChi2 !== null && f.closedDeltaChi2 < ZERO_GAP_DCHI2_95;
      zeroNotExcluded = f.closedDeltaChi2 !== null && f.closedDeltaChi2 < ZERO_GAP_DCHI2_99;
      gapSigmaProfile = f.gapSigmaProfile ?? 0;
      // Close edges in a spectrum that is nearly one V: read it as a V too; where the two readings
      // differ, the gap's uncertainty covers both (the two models are independent estimates).
      if (!isV && f.mode === "joint" && vShape !== null && vShape.deviation < 3 * st.closed.vShapeMaxDeviation) {
        const alt = fitEdges({ bias, y, kernel: kern, vbGuess: vShape.m - g, cbGuess: vShape.m + g, sigma: vShape.sigma, tau: vShape.tau, resolution_V: res_V, step_V: step, bandWindow_V: W, lo, hi });
        if (alt && Number.isFinite(alt.vb) && Number.isFinite(alt.cb))
          gapSigmaProfile = Math.max(gapSigmaProfile, Math.abs(f.cb - f.vb - Math.max(0, alt.cb - alt.vb)) / 1.959963984540054);
      }
      warnings.push(...f.warnings);
      f_warnings = f.warnings;
    } else {
      warnings.push("broadening-aware fit failed; threshold edges reported");
    }
  }
  const mV = (v: number) => `${(v * 1000).toFixed(0)} mV`;
  const sideName = { vb: "valence-band", cb: "conduction-band" } as const;
  if (method === "fit-separate") {
    // How well does the data fix each edge? The profile of the one-onset model from the other edge to
    // the band: a weak onset gives a wide range, the honest uncertainty of its edge.
    // An onset that rises far above the noise within half a band window is fixed by the curvature
    // already (its profile is as narrow); only weaker ones are profiled.
    const inner = 2 * res_V + 2 * step;
    const half = Math.max(1, Math.round(W / 2 / step));
    const strong = (i: number) => i >= lo && i <= hi && d[i] > STRONG_ONSET * sigS * Math.sqrt(bl.tau);
    const pv = strong(main.v.index - half) ? null : edgeProfileRange({ bias, y: yd, kernel: kern, lo, hi }, "vb", cb - inner, vb - W / 2, vb - W, sigmaFit, bl.tau);
    const pc = strong(main.c.index + half) ? null : edgeProfileRange({ bias, y: yd, kernel: kern, lo, hi }, "cb", vb + inner, cb + W / 2, cb + W, sigmaFit, bl.tau);
    for (const [side, pr] of [["vb", pv], ["cb", pc]] as const) {
      if (!pr) continue;
      const half = (pr.to - pr.from) / 2;
      const sig = half / 1.959963984540054;
      const edge = side === "vb" ? vb : cb;
      if (side === "vb") vbSigma = Math.max(vbSigma, sig);
      else cbSigma = Math.max(cbSigma, sig);
      if (pr.twoMinima)
        flags.push({
          code: "unreliable-edge",
          message: `Two places fit the ${sideName[side]} edge about equally well, between ${mV(pr.from)} and ${mV(pr.to)}: an in-gap feature or a second onset; ${mV(edge)} is the best fit.`,
          at_V: [pr.from, pr.to],
        });
      else if (half > Math.max(3 * res_V, 0.015, 4 * step)) {
        flags.push({
          code: "noisy",
          message: `The ${sideName[side]} onset is weak against the noise: its edge could lie anywhere from ${mV(pr.from)} to ${mV(pr.to)} (95%); ${mV(edge)} is the best fit.`,
          at_V: [pr.from, pr.to],
        });
      }
    }
    if (f_warnings.some((w) => w.includes("search limit")))
      flags.push({ code: "unreliable-edge", message: "The edge fit reached the end of its search range: the onset does not look like a band edge there." });
  }
  // The background model's share of the uncertainty: a weak onset read against a sloped floor depends on
  // the slope (a weak band rising slowly and a tilted floor look alike). Where the onset half a band
  // window out is below WEAK_ON_SLOPE noise levels, the edge read against a flat floor (the first look)
  // is as plausible: the uncertainty covers both readings, and a flag says so.
  let bgSigma = 0;
  {
    const halfW = Math.max(1, Math.round(W / 2 / step));
    for (const side of ["vb", "cb"] as const) {
      // The floor was sloped, or its region was cut short on this side as the start of a weak band.
      if (!(bl.degree > 0 || trimmed[side])) continue;
      const at = side === "vb" ? Math.max(lo, main.v.index - halfW) : Math.min(hi, main.c.index + halfW);
      const strength = d[at] / (sigS * Math.sqrt(bl.tau));
      const edge = side === "vb" ? vb : cb;
      const alt = (side === "vb" ? flatLook.v : flatLook.c)?.edge;
      if (!(strength < WEAK_ON_SLOPE) || alt === undefined) continue;
      // The onset itself may start anywhere from the floor's quietest point to the sloped reading (a weak
      // band crosses any threshold late): that range is the edge's honest ±2σ.
      const inner = bias[nf.iMin];
      const from = Math.min(inner, edge, alt);
      const to = Math.max(inner, edge, alt);
      const sig = Math.max(edge - from, to - edge) / 2;
      const own = side === "vb" ? vbSigma : cbSigma;
      if (!(sig > own)) continue;
      if (side === "vb") vbSigma = sig;
      else cbSigma = sig;
      bgSigma = Math.hypot(bgSigma, sig);
      flags.push({
        code: "unreliable-edge",
        message: `The ${sideName[side]} onset is weak and the in-gap floor ${bl.degree > 0 ? "slopes" : "wanders"}: the rise may be the floor's ${bl.degree > 0 ? "slope" : "drift"} or a weak band. Read against the ${bl.degree > 0 ? "sloped" : "fitted"} floor the edge is at ${mV(edge)}, against a flat first look at ${mV(alt)}, and the floor's quietest point is at ${mV(inner)}: the onset is not pinned down between ${mV(from)} and ${mV(to)}.`,
        at_V: [from, to],
      });
    }
  }
  // A much sharper rise beyond an edge than at it: the edge may be a sloped floor crossing the threshold.
  if (!isV) {
    const sharper = sharperRise(bias, s, main.v.index, main.c.index, lo, hi, res_V / step);
    for (const side of ["vb", "cb"] as const) {
      const at = sharper[side];
      if (at === null) continue;
      flags.push({
        code: "unreliable-edge",
        message: `The signal rises much more steeply at ${mV(at)} than at the ${sideName[side]} edge (${mV(side === "vb" ? vb : cb)}): the edge may sit on a sloped floor inside the gap, with the band's onset at ${mV(at)}.`,
        at_V: [at],
      });
    }
  }
  // Beyond an edge the signal may go on as one straight line with the tilted floor (the quiet run under
  // the tilt reaches far past the edge): a weak band's onset is then hidden in the slope, anywhere along
  // that run. The uncertainty covers the run, and a flag says so.
  // The floor between the edges must share the line's slope (else the line is a band's own rise).
  const floorSlope = () => {
    const a = main.v!.index + keep;
    const b = main.c!.index - keep;
    if (b - a < 8) return NaN;
    return polyFit(bias, s, a, b, 1, bias[a], new Uint8Array(b - a + 1).fill(1))?.[1] ?? NaN;
  };
  if (straightRun && !isV && Math.abs(floorSlope() - straightRun.coef[1]) <= 0.5 * Math.abs(straightRun.coef[1])) {
    for (const side of ["vb", "cb"] as const) {
      const edge = side === "vb" ? vb : cb;
      const end = bias[side === "vb" ? straightRun.from : straightRun.to];
      const beyond = side === "vb" ? edge - end : end - edge;
      if (!(beyond > Math.max(4 * res_V, 0.04))) continue;
      // On the line, not only below it: the run's points beyond the edge within ±2k noise levels of it.
      const [a, b] = side === "vb" ? [straightRun.from, main.v.index] : [main.c.index, straightRun.to];
      let on = 0;
      for (let i = a; i <= b; i++) if (Math.abs(s[i] - baselineAt(straightRun, bias[i])) < 2 * st.threshold.k * sigmaWide) on++;
      if (on < 0.9 * (b - a + 1)) continue;
      const sig = beyond / 2;
      if (side === "vb") vbSigma = Math.max(vbSigma, sig);
      else cbSigma = Math.max(cbSigma, sig);
      bgSigma = Math.hypot(bgSigma, sig);
      flags.push({
        code: "unreliable-edge",
        message: `Beyond the ${sideName[side]} edge (${mV(edge)}) the signal goes on as one straight line with the sloped floor as far as ${mV(end)}: a weak band's onset could lie anywhere between them.`,
        at_V: side === "vb" ? [end, edge] : [edge, end],
      });
    }
  }
  // The in-gap floor: say so when it slopes or curves enough to matter for the threshold.
  if (bl.degree > 0) {
    const change = Math.abs(baselineAt(bl, cb) - baselineAt(bl, vb));
    const stepV = d[Math.max(lo, main.v.index - span)];
    const stepC = d[Math.min(hi, main.c.index + span)];
    if (change > Math.max(5 * sigS, 0.1 * Math.min(stepV, stepC)))
      flags.push({ code: "sloped-background", message: `The in-gap floor is not flat (a ${bl.degree === 1 ? "linear" : "quadratic"} baseline changes by ${(change / Math.max(sigS, 1e-300)).toFixed(0)}σ across the gap); the edges were read against it.` });
  }
  const gap = Math.max(0, cb - vb);
  // Jointly fitted edges are strongly correlated: the gap's own profile is its uncertainty (the edges'
  // separate σ add in quadrature only for separate fits).
  let uncertainty = method === "fit-joint" ? Math.max(gapSigmaProfile, Math.hypot(sampling / 4, 0.05 * res_V)) : Math.max(Math.hypot(vbSigma, cbSigma), gapSigmaProfile);
  uncertainty = Math.max(uncertainty, bgSigma);
  if (zeroNotExcluded) {
    // A zero gap is not excluded (Δχ² below its simulated 99% point): the 95% range reaches zero.
    uncertainty = Math.max(uncertainty, gap / 1.959963984540054);
  }
  // Closed only where the data pin the gap down: its 95% upper bound within five resolutions (20 mV).
  const bound = gap + 1.959963984540054 * uncertainty;
  const pinned = bound <= Math.max(5 * res_V, 0.02);
  const closed = isV && (gap < res_V || consistentWithZero) && pinned;
  if (closed) warnings.push("gap consistent with zero at 95% (closed within resolution)");
  else if (isV && !pinned)
    flags.push({ code: "unreliable-edge", message: `A V-shaped minimum without a flat floor, but the data do not pin the gap down: anywhere from 0 to ${mV(bound)} (95%).` });
  return {
    status: "ok",
    vbEdge_V: vb,
    cbEdge_V: cb,
    gap_eV: gap,
    midgap_V: (vb + cb) / 2,
    uncertainty_eV: uncertainty,
    vbSigma_V: vbSigma,
    cbSigma_V: cbSigma,
    // "Closed" needs evidence: a V-shaped minimum, and a gap below the resolution or consistent with zero.
    closed,
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

/**
 * Where the smoothed signal rises at least SHARPER_RISE times more steeply beyond an edge (away from the
 * gap, up to the search range's end) than anywhere within three resolutions of the edge; null per side
 * when it does not. Slopes are differences over ±1 resolution (`resPoints`: the resolution in points) of the
 * smoothed curve.
 */
function sharperRise(bias: Float64Array, s: Float64Array, iv: number, ic: number, lo: number, hi: number, resPoints: number): { vb: number | null; cb: number | null } {
  const h = Math.max(1, Math.round(resPoints));
  const w = Math.max(1, Math.round(3 * resPoints));
  const slope = (i: number) => {
    const a = Math.max(lo, i - h);
    const b = Math.min(hi, i + h);
    return (s[b] - s[a]) / (bias[b] - bias[a]);
  };
  const look = (ie: number, dir: 1 | -1): number | null => {
    let atEdge = 0;
    for (let i = Math.max(lo, ie - w); i <= Math.min(hi, ie + w); i++) atEdge = Math.max(atEdge, dir * slope(i));
    let best = 0;
    let where = -1;
    for (let i = ie + dir * (w + 1); i >= lo && i <= hi; i += dir) {
      const r = dir * slope(i);
      if (r > best) {
        best = r;
        where = i;
      }
    }
    return where >= 0 && best > SHARPER_RISE * Math.max(atEdge, 0) && best > 0 ? bias[where] : null;
  };
  return { vb: look(iv, -1), cb: look(ic, 1) };
}
