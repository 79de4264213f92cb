/** Small numerical helpers shared by the analysis modules: robust statistics and linear least squares. */

/** k-th smallest element (0-based) of a, rearranging a in place (Hoare's selection, O(n) expected). */
function select(a: Float64Array, k: number): number {
  let lo = 0;
  let hi = a.length - 1;
  while (hi > lo) {
    const mid = (lo + hi) >> 1;
    // Median of three as the pivot.
    let x = a[lo], y = a[mid], z = a[hi];
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        x = a[i];
        a[i] = a[j];
        a[j] = x;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k];
  }
  return a[k];
}

/** Smallest element of a[from…]. */
function minFrom(a: Float64Array, from: number): number {
  let m = a[from];
  for (let i = from + 1; i < a.length; i++) if (a[i] < m) m = a[i];
  return m;
}

/** Median of the values (by selection on a copy); NaN for an empty input. */
export function median(values: ArrayLike<number>): number {
  return values.length === 0 ? NaN : medianInPlace(Float64Array.from(values as ArrayLike<number>));
}

/** The median of `a`, reordering `a` (no copy). */
function medianInPlace(a: Float64Array): number {
  const n = a.length;
  const h = n >> 1;
  const upper = select(a, h);
  if (n % 2) return upper;
  // After selection every element left of h is ≤ a[h]: the lower middle is their maximum.
  let lower = a[0];
  for (let i = 1; i < h; i++) if (a[i] > lower) lower = a[i];
  return 0.5 * (lower + upper);
}

/** Linear-interpolated quantile (q in [0, 1]), the "type 7" definition used by numpy's default. */
export function quantile(values: ArrayLike<number>, q: number): number {
  const n = values.length;
  if (n === 0) return NaN;
  const a = Float64Array.from(values as ArrayLike<number>);
  const pos = q * (n - 1);
  const lo = Math.floor(pos);
  const vlo = select(a, lo);
  if (lo + 1 >= n || pos === lo) return vlo;
  // Elements right of lo are ≥ a[lo]; the next order statistic is their minimum.
  const vhi = minFrom(a, lo + 1);
  return vlo + (vhi - vlo) * (pos - lo);
}

/** Scale factor from the median absolute deviation to σ for Gaussian noise: 1/Φ⁻¹(3/4). */
export const MAD_TO_SIGMA = 1.482602218505602;

/** Robust σ estimate: 1.4826 × median(|x − median(x)|). */
export function madSigma(values: ArrayLike<number>): number {
  if (values.length === 0) return NaN;
  // One copy: the deviations do not depend on the order the first selection left behind.
  const a = Float64Array.from(values as ArrayLike<number>);
  const m = medianInPlace(a);
  for (let i = 0; i < a.length; i++) a[i] = Math.abs(a[i] - m);
  return MAD_TO_SIGMA * medianInPlace(a);
}

/**
 * Solve the symmetric positive (semi-)definite system A x = b by Gaussian elimination with
 * partial pivoting. `a` is row-major n×n. Returns null when the matrix is singular to working precision.
 */
export function solveLinear(a: Float64Array, b: Float64Array, n: number): Float64Array | null {
  const x = Float64Array.from(b);
  return solveInPlace(Float64Array.from(a), x, n) ? x : null;
}

/**
 * The same elimination without allocating: `m` (row-major n×n) is overwritten, `x` holds b on entry
 * and the solution on return. False when a pivot is below `relTol` × the largest entry of `m`.
 * Hot loops (the edge fit) call this on scratch buffers.
 */
export function solveInPlace(m: Float64Array, x: Float64Array, n: number, relTol = 1e-14): boolean {
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(m[i]));
  const tiny = scale * relTol;
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r * n + c]) > Math.abs(m[p * n + c])) p = r;
    if (!(Math.abs(m[p * n + c]) > tiny)) return false;
    if (p !== c) {
      for (let k = 0; k < n; k++) {
        const t = m[c * n + k];
        m[c * n + k] = m[p * n + k];
        m[p * n + k] = t;
      }
      const t = x[c];
      x[c] = x[p];
      x[p] = t;
    }
    const d = m[c * n + c];
    for (let r = c + 1; r < n; r++) {
      const f = m[r * n + c] / d;
      if (f === 0) continue;
      for (let k = c; k < n; k++) m[r * n + k] -= f * m[c * n + k];
      x[r] -= f * x[c];
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let s = x[r];
    for (let k = r + 1; k < n; k++) s -= m[r * n + k] * x[k];
    x[r] = s / m[r * n + r];
  }
  return true;
}

/** Invert a small symmetric matrix (row-major n×n); null when singular. */
export function invert(a: Float64Array, n: number): Float64Array | null {
  const out = new Float64Array(n * n);
  for (let c = 0; c < n; c++) {
    const e = new Float64Array(n);
    e[c] = 1;
    const col = solveLinear(a, e, n);
    if (!col) return null;
    for (let r = 0; r < n; r++) out[r * n + c] = col[r];
  }
  return out;
}

export interface LeastSquaresResult {
  /** Fitted coefficients. */
  coef: Float64Array;
  /** Covariance of the coefficients, (XᵀWX)⁻¹ (not rescaled by the residual variance). */
  cov: Float64Array;
  /** Weighted residual sum of squares Σ wᵢ (yᵢ − ŷᵢ)². */
  rss: number;
}

/**
 * Weighted linear least squares y ≈ X·coef with weights w (1/σ² for χ²), via the normal equations.
 * `columns` holds the p columns of X (each length n). Returns null when XᵀWX is singular.
 */
export function linearLeastSquares(
  columns: ArrayLike<number>[],
  y: ArrayLike<number>,
  w?: ArrayLike<number>,
): LeastSquaresResult | null {
  const p = columns.length;
  const n = y.length;
  const a = new Float64Array(p * p);
  const b = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    for (let r = 0; r < p; r++) {
      const xr = columns[r][i] * wi;
      b[r] += xr * y[i];
      for (let c = r; c < p; c++) a[r * p + c] += xr * columns[c][i];
    }
  }
  for (let r = 0; r < p; r++) for (let c = 0; c < r; c++) a[r * p + c] = a[c * p + r];
  const coef = solveLinear(a, b, p);
  if (!coef) return null;
  const cov = invert(a, p) ?? new Float64Array(p * p).fill(NaN);
  let rss = 0;
  for (let i = 0; i < n; i++) {
    let f = 0;
    for (let r = 0; r < p; r++) f += coef[r] * columns[r][i];
    const d = y[i] - f;
    rss += (w ? w[i] : 1) * d * d;
  }
  return { coef, cov, rss };
}

/** Minimise a unimodal f on [a, b] by golden-section search to absolute tolerance tol. */
export function goldenMinimize(f: (x: number) => number, a: number, b: number, tol: number): { x: number; fx: number } {
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = f(c);
  let fd = f(d);
  let it = 0;
  while (Math.abs(b - a) > tol && it++ < 200) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = f(d);
    }
  }
  return fc < fd ? { x: c, fx: fc } : { x: d, fx: fd };
}

/**
 * Minimise f on [a, b] by Brent's method (golden-section steps with parabolic interpolation), to
 * absolute tolerance tol. R. P. Brent, "Algorithms for Minimization without Derivatives" (1973), ch. 5.
 */
export function brentMinimize(f: (x: number) => number, a: number, b: number, tol: number, maxIter = 60): { x: number; fx: number } {
  const cgold = 0.381966011250105;
  let x = a + cgold * (b - a);
  let w = x;
  let v = x;
  let fx = f(x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  for (let it = 0; it < maxIter; it++) {
    const m = 0.5 * (a + b);
    const tol1 = tol / 3 + 1e-12 * Math.abs(x);
    const tol2 = 2 * tol1;
    if (Math.abs(x - m) <= tol2 - 0.5 * (b - a)) break;
    let golden = true;
    if (Math.abs(e) > tol1) {
      const r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      else q = -q;
      if (Math.abs(p) < Math.abs(0.5 * q * e) && p > q * (a - x) && p < q * (b - x)) {
        e = d;
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = x < m ? tol1 : -tol1;
        golden = false;
      }
    }
    if (golden) {
      e = (x < m ? b : a) - x;
      d = cgold * e;
    }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d > 0 ? tol1 : -tol1);
    const fu = f(u);
    if (fu <= fx) {
      if (u < x) b = x;
      else a = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  return { x, fx };
}

/**
 * Linear interpolation of (x, y) (x ascending) at the points `at`; outside x the end values hold.
 * Both `at` and x are walked once, so `at` must be ascending too.
 */
export function interpolateOnto(at: ArrayLike<number>, x: ArrayLike<number>, y: ArrayLike<number>): Float64Array {
  const n = x.length;
  const out = new Float64Array(at.length);
  let j = 0;
  for (let i = 0; i < at.length; i++) {
    const v = at[i];
    while (j < n - 2 && x[j + 1] < v) j++;
    const f = (v - x[j]) / (x[j + 1] - x[j]);
    out[i] = y[j] + Math.min(1, Math.max(0, f)) * (y[j + 1] - y[j]);
  }
  return out;
}

/** Centred moving average of x over 2·half + 1 points (fewer at the ends), by running sums. */
export function movingAverage(x: ArrayLike<number>, half: number): Float64Array {
  const n = x.length;
  const cum = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) cum[i + 1] = cum[i] + x[i];
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const a = Math.max(0, i - half);
    const b = Math.min(n, i + half + 1);
    out[i] = (cum[b] - cum[a]) / (b - a);
  }
  return out;
}
