/**
 * FFT low-pass filter with mirrored padding.
 *
 * The signal is extended on both sides by its mirror image (so the periodic extension has no jump),
 * padded to a power of two, transformed with fft.js, multiplied by a transfer function that is 1 below
 * the cut-off frequency, falls as a raised cosine to 0 at 1.5× the cut-off, and transformed back; the
 * middle is returned.
 */
import FFT from "fft.js";

function nextPow2(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

/**
 * @param y samples on a uniform axis
 * @param cutoffPeriodPoints the shortest period kept, in points (> 2); components with periods shorter
 *   than ⅔ of it are removed completely
 * @returns filtered Float64Array of the same length
 */
export function fftLowpass(y: ArrayLike<number>, cutoffPeriodPoints: number): Float64Array {
  if (!(cutoffPeriodPoints > 2) || !Number.isFinite(cutoffPeriodPoints))
    throw new RangeError(`FFT cut-off period must exceed 2 points, got ${cutoffPeriodPoints}`);
  const n = y.length;
  const size = nextPow2(2 * n);
  const padLeft = Math.floor((size - n) / 2);
  const input = new Array<number>(size);
  const reflect = (i: number): number => {
    const period = 2 * n;
    let m = ((i % period) + period) % period;
    if (m >= n) m = period - 1 - m;
    return m;
  };
  for (let i = 0; i < size; i++) input[i] = y[reflect(i - padLeft)];
  const f = new FFT(size);
  const spec = f.createComplexArray() as number[];
  f.realTransform(spec, input);
  f.completeSpectrum(spec);
  const fc = 1 / cutoffPeriodPoints; // cycles per point
  for (let k = 0; k < size; k++) {
    const freq = Math.min(k, size - k) / size;
    let h = 1;
    if (freq > fc) h = freq >= 1.5 * fc ? 0 : 0.5 * (1 + Math.cos((Math.PI * (freq - fc)) / (0.5 * fc)));
    spec[2 * k] *= h;
    spec[2 * k + 1] *= h;
  }
  const back = f.createComplexArray() as number[];
  f.inverseTransform(back, spec);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = back[2 * (i + padLeft)];
  return out;
}
