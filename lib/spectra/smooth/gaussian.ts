/**
 * Gaussian smoothing by direct convolution with a normalised Gaussian truncated at ±4σ, with the
 * signal reflected about its ends (half-sample symmetric, "d c b a | a b c d"), like
 * `scipy.ndimage.gaussian_filter1d(mode="reflect", truncate=4)`.
 */

/**
 * @param y samples on a uniform axis
 * @param sigmaPoints standard deviation of the kernel in points (> 0)
 * @returns smoothed Float64Array of the same length
 */
export function gaussianSmooth(y: ArrayLike<number>, sigmaPoints: number): Float64Array {
  if (!(sigmaPoints > 0) || !Number.isFinite(sigmaPoints))
    throw new RangeError(`Gaussian σ must be a positive number of points, got ${sigmaPoints}`);
  const n = y.length;
  const r = Math.max(1, Math.round(4 * sigmaPoints));
  const k = new Float64Array(2 * r + 1);
  let sum = 0;
  for (let j = -r; j <= r; j++) {
    const v = Math.exp(-0.5 * (j / sigmaPoints) ** 2);
    k[j + r] = v;
    sum += v;
  }
  for (let j = 0; j < k.length; j++) k[j] /= sum;
  const reflect = (i: number): number => {
    if (n === 1) return 0;
    const period = 2 * n;
    let m = ((i % period) + period) % period;
    if (m >= n) m = period - 1 - m;
    return m;
  };
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let acc = 0;
    if (i - r >= 0 && i + r < n) {
      for (let j = -r; j <= r; j++) acc += k[j + r] * y[i + j];
    } else {
      for (let j = -r; j <= r; j++) acc += k[j + r] * y[reflect(i + j)];
    }
    out[i] = acc;
  }
  return out;
}
