/**
 * Savitzky–Golay least-squares polynomial filters.
 *
 * Method: within a window of `window` points (odd), fit a polynomial of degree `order` by least squares
 * and take its value (or its `deriv`-th derivative) at the evaluation point. Away from the ends the
 * filter is a fixed convolution; within half a window of either end the polynomial fitted to the first
 * (last) full window is evaluated at each end point, as `scipy.signal.savgol_filter(mode="interp")` does.
 *
 * Sources: A. Savitzky & M. J. E. Golay, Anal. Chem. 36, 1627 (1964); corrections by J. Steinier,
 * Y. Termonia & J. Deltour, Anal. Chem. 44, 1906 (1972).
 */
import { solveLinear } from "../stats";

function factorial(n: number): number {
  let f = 1;
  for (let i = 2; i <= n; i++) f *= i;
  return f;
}

function checkArgs(window: number, order: number, deriv: number): void {
  if (!Number.isInteger(window) || window < 1 || window % 2 === 0)
    throw new RangeError(`Savitzky–Golay window must be a positive odd number of points, got ${window}`);
  if (!Number.isInteger(order) || order < 0 || order >= window)
    throw new RangeError(`Savitzky–Golay order must be an integer in [0, window), got ${order}`);
  if (!Number.isInteger(deriv) || deriv < 0)
    throw new RangeError(`derivative order must be a non-negative integer, got ${deriv}`);
}

/**
 * Weights w_j (j = 0 … window−1, window centre at j = half) such that Σ w_j y_j is the `deriv`-th
 * derivative at offset `t` (in points, relative to the window centre) of the least-squares polynomial,
 * divided by delta^deriv.
 *
 * @param window odd number of points
 * @param order polynomial degree, 0 ≤ order < window
 * @param deriv derivative order (0 = smoothing); a derivative above `order` gives zeros
 * @param delta sample spacing (units of x per point), default 1
 * @param t evaluation offset in points, default 0 (the centre)
 */
export function savgolWeights(window: number, order: number, deriv = 0, delta = 1, t = 0): Float64Array {
  checkArgs(window, order, deriv);
  const half = (window - 1) / 2;
  const out = new Float64Array(window);
  if (deriv > order) return out;
  // Scaled abscissa x = j / s keeps the normal matrix well conditioned for wide windows.
  const s = Math.max(half, 1);
  const p = order + 1;
  const ata = new Float64Array(p * p);
  const pw = new Float64Array(p);
  for (let j = -half; j <= half; j++) {
    const x = j / s;
    pw[0] = 1;
    for (let k = 1; k < p; k++) pw[k] = pw[k - 1] * x;
    for (let r = 0; r < p; r++) for (let c = 0; c < p; c++) ata[r * p + c] += pw[r] * pw[c];
  }
  // Row vector of the deriv-th derivative of the basis at x = t/s.
  const xt = t / s;
  const e = new Float64Array(p);
  for (let k = deriv; k < p; k++) e[k] = (factorial(k) / factorial(k - deriv)) * Math.pow(xt, k - deriv);
  const z = solveLinear(ata, e, p);
  if (!z) throw new RangeError("Savitzky–Golay normal matrix is singular");
  const scale = 1 / Math.pow(s * delta, deriv);
  for (let j = -half; j <= half; j++) {
    const x = j / s;
    let v = 0;
    let xp = 1;
    for (let k = 0; k < p; k++) {
      v += z[k] * xp;
      xp *= x;
    }
    out[j + half] = v * scale;
  }
  return out;
}

const centreCache = new Map<string, Float64Array>();
const edgeCache = new Map<string, Float64Array[]>();

/**
 * Apply a Savitzky–Golay filter to y.
 *
 * @param y samples on a uniform axis
 * @param window odd window length in points (clipped by the caller to ≤ y.length)
 * @param order polynomial degree
 * @param deriv derivative order (0 = smoothing)
 * @param delta sample spacing, used only for derivatives (result per unit of x^deriv)
 * @returns Float64Array of y.length; ends handled by polynomial fit to the first/last window
 */
export function savgolFilter(y: ArrayLike<number>, window: number, order: number, deriv = 0, delta = 1): Float64Array {
  checkArgs(window, order, deriv);
  const n = y.length;
  if (window > n) throw new RangeError(`Savitzky–Golay window (${window}) exceeds the number of points (${n})`);
  const half = (window - 1) / 2;
  const key = `${window}:${order}:${deriv}:${delta}`;
  let w = centreCache.get(key);
  if (!w) {
    w = savgolWeights(window, order, deriv, delta, 0);
    centreCache.set(key, w);
  }
  let edges = edgeCache.get(key);
  if (!edges) {
    edges = [];
    for (let i = 0; i < half; i++) edges.push(savgolWeights(window, order, deriv, delta, i - half));
    edgeCache.set(key, edges);
  }
  const out = new Float64Array(n);
  for (let i = half; i < n - half; i++) {
    let acc = 0;
    const o = i - half;
    for (let j = 0; j < window; j++) acc += w[j] * y[o + j];
    out[i] = acc;
  }
  // Leading edge: fit to y[0 … window−1], evaluate at offsets −half … −1.
  // Trailing edge: by mirror symmetry, the weights for offset +m are those for −m reversed, with the
  // sign (−1)^deriv.
  const sign = deriv % 2 ? -1 : 1;
  for (let i = 0; i < half; i++) {
    const we = edges[i];
    let a = 0;
    let b = 0;
    for (let j = 0; j < window; j++) {
      a += we[j] * y[j];
      b += we[window - 1 - j] * y[n - window + j];
    }
    out[i] = a;
    out[n - 1 - i] = sign * b;
  }
  return out;
}
