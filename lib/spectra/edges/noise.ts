/**
 * Robust noise floor and σ. The quiet region is the run of points around the smoothed minimum whose
 * smoothed value stays below floor + k·σ_smoothed; the floor is the median of the raw points in it and
 * σ is 1.4826 × their median absolute deviation (MAD → σ for Gaussian noise). Three passes, starting
 * from the smoothed minimum and the MAD of the smoothing residuals over the whole spectrum.
 */
import { madSigma, median } from "../stats";
import { baselineAt, polyFit } from "./baseline";


export interface NoiseFloor {
  floor: number;
  /** σ of the raw data in the quiet region. */
  sigma: number;
  /** σ of the smoothed curve (σ × noise gain of the filter). */
  sigmaSmoothed: number;
  /** Inclusive index range of the quiet region. */
  from: number;
  to: number;
  /** Index of the smoothed minimum. */
  iMin: number;
}

/**
 * @param y raw samples
 * @param s smoothed samples
 * @param gain noise gain of the smoothing filter, √(Σ hᵢ²) for its impulse response h
 * @param k threshold multiplier
 * @param lo first index searched; hi last index searched (inclusive)
 */
export function noiseFloor(y: Float64Array, s: Float64Array, gain: number, k: number, lo: number, hi: number): NoiseFloor {
  let iMin = lo;
  for (let i = lo; i <= hi; i++) if (s[i] < s[iMin]) iMin = i;
  // σ from first differences (white noise: var(Δy) = 2σ²), which removes the slow signal and leaves
  // the band edges as a few outliers that the median ignores; independent of the smoothing filter.
  const diffSigma = (a: number, b: number) => {
    const d = new Float64Array(b - a);
    for (let i = a; i < b; i++) d[i - a] = y[i + 1] - y[i];
    return madSigma(d) / Math.SQRT2;
  };
  let sigma = diffSigma(lo, hi);
  let floor = s[iMin];
  let from = iMin;
  let to = iMin;
  for (let pass = 0; pass < 5; pass++) {
    // The smoothed minimum of a long quiet run sits a few σ below the floor: start generously.
    const level = floor + (pass === 0 ? 2 * k : k) * sigma * gain;
    const f0 = from;
    const t0 = to;
    from = iMin;
    to = iMin;
    while (from > lo && s[from - 1] < level) from--;
    while (to < hi && s[to + 1] < level) to++;
    floor = median(y.subarray(from, to + 1));
    if (to - from + 1 >= 30) {
      const sg = diffSigma(from, to);
      if (sg > 0) sigma = sg;
    }
    if (pass > 0 && from === f0 && to === t0) break;
  }
  return { floor, sigma, sigmaSmoothed: sigma * gain, from, to, iMin };
}

/**
 * A floor that tilts. A linear background in dI/dV (tip states, capacitive leakage into the lock-in)
 * tilts the in-gap floor, and a flat first look then finds only the stretch near its lower end, with
 * the rest of the gap read as a band. Under the right tilt the floor is one long quiet run: for each
 * trial slope m (a coarse grid, then a finer one around the best), the run of the smoothed curve minus
 * m·V around its minimum that stays below that minimum + 2k·σ_smoothed; the slope giving the longest
 * run wins, slope 0 on ties. The run must hold the flat look's minimum `iMin` (the lowest point of a
 * tilted floor is its lower end; a long straight stretch of a band elsewhere is a run too, but not the
 * floor). The caller decides whether the tilt is worth taking (it must lengthen the run by far) and the
 * baseline fit decides from the data whether the slope is real.
 */
export function quietTilt(bias: Float64Array, s: Float64Array, top: number, sigmaSmoothed: number, k: number, lo: number, hi: number, iMin: number): { slope: number; from: number; to: number; flatWidth: number } {
  const c = 0.5 * (bias[lo] + bias[hi]);
  let sMin = s[lo];
  for (let i = lo; i <= hi; i++) if (s[i] < sMin) sMin = s[i];
  // Slopes up to twice the signal's spread (`top`: its 95th percentile, which the caller has) per range.
  const spread = top - sMin;
  const mMax = (2 * spread) / Math.max(bias[hi] - bias[lo], 1e-12);
  // The lowest point under a tilt m (min of s − m·bias) is a vertex of the lower convex hull of the
  // points: the first vertex whose outgoing edge is at least as steep as m (monotone chain, Andrew 1979).
  const hull: number[] = [];
  for (let i = lo; i <= hi; i++) {
    while (hull.length >= 2) {
      const a = hull[hull.length - 2];
      const b = hull[hull.length - 1];
      if ((s[b] - s[a]) * (bias[i] - bias[a]) >= (s[i] - s[a]) * (bias[b] - bias[a])) hull.pop();
      else break;
    }
    hull.push(i);
  }
  const edgeSlope = Float64Array.from({ length: hull.length - 1 }, (_, k) => (s[hull[k + 1]] - s[hull[k]]) / (bias[hull[k + 1]] - bias[hull[k]]));
  const run = (m: number) => {
    let a = 0;
    let b = edgeSlope.length;
    while (a < b) {
      const mid = (a + b) >> 1;
      if (edgeSlope[mid] < m) a = mid + 1;
      else b = mid;
    }
    const j = hull[a];
    const dj = s[j] - m * (bias[j] - c);
    const level = dj + 2 * k * sigmaSmoothed;
    let from = j;
    let to = j;
    while (from > lo && s[from - 1] - m * (bias[from - 1] - c) < level) from--;
    while (to < hi && s[to + 1] - m * (bias[to + 1] - c) < level) to++;
    return { from, to, width: to - from + 1 };
  };
  const flat = run(0);
  let best = { slope: 0, ...flat };
  const scan = (a: number, b: number, steps: number) => {
    for (let t = 0; t <= steps; t++) {
      const m = a + ((b - a) * t) / steps;
      const r = run(m);
      if (r.width > best.width && r.from <= iMin && iMin <= r.to) best = { slope: m, ...r };
    }
  };
  if (mMax > 0) {
    scan(-mMax, mMax, 40);
    const dm = mMax / 20;
    scan(best.slope - dm, best.slope + dm, 20);
  }
  return { slope: best.slope, from: best.from, to: best.to, flatWidth: flat.width };
}

/**
 * The quiet run of a curved floor (a tilt plus curvature: a bias-dependent transmission or the tip's
 * density of states): starting from a quiet run, fit a quadratic to the smoothed signal over it and take
 * the run of points within 2k·σ of that quadratic's lowest residual, around it; repeat while the run
 * grows (at most `rounds` times). Returns the quadratic (coefficients in powers of bias − center, for
 * `baselineAt`) and the run, or null when the fit fails.
 */
export function quietCurve(bias: Float64Array, s: Float64Array, sigmaSmoothed: number, k: number, lo: number, hi: number, from: number, to: number, rounds = 4): { coef: Float64Array; center: number; from: number; to: number } | null {
  let out: { coef: Float64Array; center: number; from: number; to: number } | null = null;
  for (let r = 0; r < rounds; r++) {
    if (to - from + 1 < 12) return out;
    const center = 0.5 * (bias[from] + bias[to]);
    const coef = polyFit(bias, s, from, to, 2, center, new Uint8Array(to - from + 1).fill(1));
    if (!coef) return out;
    const d = (i: number) => s[i] - baselineAt({ coef, center }, bias[i]);
    let j = from;
    for (let i = from; i <= to; i++) if (d(i) < d(j)) j = i;
    const level = d(j) + 2 * k * sigmaSmoothed;
    let a = j;
    let b = j;
    while (a > lo && d(a - 1) < level) a--;
    while (b < hi && d(b + 1) < level) b++;
    const grew = b - a > to - from;
    out = { coef, center, from: a, to: b };
    if (!grew) return out;
    from = a;
    to = b;
  }
  return out;
}
