/**
 * Robust noise floor and σ. The quiet region is the run of points around the smoothed minimum whose
 * smoothed value stays below floor + k·σ_smoothed; the floor is the median of the raw points in it and
 * σ is 1.4826 × their median absolute deviation (MAD → σ for Gaussian noise). Three passes, starting
 * from the smoothed minimum and the MAD of the smoothing residuals over the whole spectrum.
 */
import { madSigma, median } from "../stats";


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
