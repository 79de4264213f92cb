/**
 * Cumulative trapezoid integration, and the tunnelling current rebuilt from dI/dV.
 *
 * `cumulativeTrapezoid(y, x)` is Σ ½(yᵢ + yᵢ₋₁)(xᵢ − xᵢ₋₁) from the first point, starting at 0: the same
 * numbers as `scipy.integrate.cumulative_trapezoid(y, x, initial=0)` (golden vectors in the tests).
 * `currentFromDidv` shifts that integral so that I(0 V) = 0 (no current flows without bias), with the
 * value at 0 V interpolated linearly between the two points around it.
 */
import { PrepareError } from "./errors";

export function cumulativeTrapezoid(y: ArrayLike<number>, x: ArrayLike<number>): Float64Array {
  const n = y.length;
  if (x.length !== n) throw new RangeError("x and y must have the same length");
  const out = new Float64Array(n);
  for (let i = 1; i < n; i++) out[i] = out[i - 1] + 0.5 * (y[i] + y[i - 1]) * (x[i] - x[i - 1]);
  return out;
}

/**
 * I(V) = ∫₀^V dI/dV dV′ by the cumulative trapezoid, in the units of dI/dV × V. The bias must be
 * ascending and reach 0 V (within its range); otherwise I(0) = 0 cannot be placed and PrepareError says so.
 */
export function currentFromDidv(bias_V: ArrayLike<number>, didv: ArrayLike<number>): Float64Array {
  const n = bias_V.length;
  if (n < 2 || !(bias_V[0] <= 0 && bias_V[n - 1] >= 0))
    throw new PrepareError(
      "the bias range does not include 0 V, so the current cannot be rebuilt from dI/dV with I(0) = 0; " +
        "give a current column",
    );
  const cum = cumulativeTrapezoid(didv, bias_V);
  let j = 0;
  while (j < n - 2 && bias_V[j + 1] < 0) j++;
  const f = bias_V[j + 1] === bias_V[j] ? 0 : (0 - bias_V[j]) / (bias_V[j + 1] - bias_V[j]);
  // The integral up to 0 V: the trapezoid of the part of the step [x_j, 0], with dI/dV interpolated at 0.
  const y0 = didv[j] + f * (didv[j + 1] - didv[j]);
  const at0 = cum[j] + 0.5 * (didv[j] + y0) * (0 - bias_V[j]);
  for (let i = 0; i < n; i++) cum[i] -= at0;
  return cum;
}
