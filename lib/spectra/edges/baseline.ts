/**
 * The in-gap baseline and the noise about it.
 *
 * Real dI/dV spectra have an in-gap floor that slopes or curves (the tip's density of states, the
 * bias-dependent transmission, a setpoint effect, capacitive leakage into the lock-in), and noise that
 * is correlated from point to point (the lock-in's time constant, 1/f noise of the junction, drift). A
 * constant floor with a σ from first differences fails on both: the floor crosses a threshold early and
 * the σ misses the slow noise. So:
 *
 * 1. The baseline is a robust polynomial of low degree (0–2, chosen by the quiet region's width and
 *    the settings) fitted by least squares to the raw points of the quiet region, with points beyond
 *    3σ of the fit left out and the fit repeated (iterative sigma clipping; common practice).
 * 2. The quiet region is the run of points around the minimum of (smoothed − baseline) that stay below
 *    baseline + level; it and the baseline are found together in a few passes.
 * 3. σ of the raw data is 1.4826 × MAD of the residuals about the baseline; σ of the smoothed curve is
 *    measured the same way on the smoothed residuals, so correlated noise (which smoothing removes less
 *    well than white noise) is seen at the scale the threshold reads — never below the white-noise
 *    prediction σ × gain.
 * 4. The residuals' integrated autocorrelation time τ = 1 + 2 Σₖ ρₖ (summed while ρₖ > 0, up to a
 *    window of 5τ; Sokal's automatic windowing, common practice) gives the effective sample size
 *    n_eff = n / τ; for AR(1) noise τ = (1 + ρ)/(1 − ρ), the textbook variance inflation of a mean
 *    (H. von Storch & F. W. Zwiers, Statistical Analysis in Climate Research, 1999; from memory).
 *    Standard errors of quantities fitted to the raw data are multiplied by √τ.
 */
import { linearLeastSquares, madSigma, median, solveLinear } from "../stats";

export interface Baseline {
  /** Polynomial coefficients in powers of (V − center). */
  coef: Float64Array;
  center: number;
  degree: number;
  /** σ of the raw data about the baseline (quiet region). */
  sigma: number;
  /** σ of the smoothed curve about the baseline (quiet region), ≥ σ × gain. */
  sigmaSmoothed: number;
  /** Integrated autocorrelation time of the raw residuals (1 for white noise). */
  tau: number;
  /** Inclusive index range of the quiet region. */
  from: number;
  to: number;
  /** Index of the minimum of smoothed − baseline. */
  iMin: number;
}

export function baselineAt(b: Pick<Baseline, "coef" | "center">, v: number): number {
  const x = v - b.center;
  let y = 0;
  for (let k = b.coef.length - 1; k >= 0; k--) y = y * x + b.coef[k];
  return y;
}

/** Least-squares polynomial of `degree` in (V − center) through the used points; null if singular. */
export function polyFit(bias: Float64Array, y: Float64Array, from: number, to: number, degree: number, center: number, use: Uint8Array): Float64Array | null {
  const p = degree + 1;
  const a = new Float64Array(p * p);
  const r = new Float64Array(p);
  const pw = new Float64Array(2 * p);
  // Scale x to order one for conditioning.
  const scale = Math.max(Math.abs(bias[from] - center), Math.abs(bias[to] - center), 1e-9);
  for (let i = from; i <= to; i++) {
    if (!use[i - from]) continue;
    const x = (bias[i] - center) / scale;
    pw[0] = 1;
    for (let k = 1; k < 2 * p; k++) pw[k] = pw[k - 1] * x;
    for (let j = 0; j < p; j++) {
      r[j] += pw[j] * y[i];
      for (let k = 0; k < p; k++) a[j * p + k] += pw[j + k];
    }
  }
  const c = solveLinear(a, r, p);
  if (!c) return null;
  for (let k = 1; k < p; k++) c[k] /= Math.pow(scale, k);
  return c;
}

/** Integrated autocorrelation time and lag-1 correlation of x (mean removed). */
export function autocorrelationTime(x: ArrayLike<number>): { tau: number; rho1: number } {
  const n = x.length;
  if (n < 8) return { tau: 1, rho1: 0 };
  let mean = 0;
  for (let i = 0; i < n; i++) mean += x[i];
  mean /= n;
  let c0 = 0;
  for (let i = 0; i < n; i++) c0 += (x[i] - mean) ** 2;
  if (!(c0 > 0)) return { tau: 1, rho1: 0 };
  const rho = (k: number) => {
    let c = 0;
    for (let i = 0; i + k < n; i++) c += (x[i] - mean) * (x[i + k] - mean);
    return c / c0;
  };
  const rho1 = rho(1);
  let tau = 1;
  const maxLag = Math.floor(n / 4);
  for (let k = 1; k <= maxLag; k++) {
    const r = rho(k);
    if (r <= 0) break;
    tau += 2 * r;
    if (k >= 5 * tau) break;
  }
  return { tau: Math.max(1, tau), rho1 };
}

/**
 * A weak band onset at an end of the quiet region looks like a slow rise that a polynomial would
 * follow. Test each end for an onset: the polynomial plus a step and a kink, H(x) and x·H(x) at a
 * trial edge in the outer half of the region (16 trials), against the polynomial alone. If the best
 * trial lowers χ² (σ² × τ per point, for correlated noise) by more than `minDeltaChi2`, the region ends
 * at that edge. With `sigma` null, σ and τ come from the residuals of the best trial (the largest model:
 * the polynomial's own residuals hold the onset it misses). Returns the new range (unchanged when no end
 * holds an onset).
 */
export function trimOnsets(bias: Float64Array, y: Float64Array, from: number, to: number, degree: number, center: number, sigma: number | null, tau: number, minDeltaChi2: number): { from: number; to: number } {
  const npts = to - from + 1;
  if (npts < 16 || (sigma !== null && !(sigma > 0))) return { from, to };
  const scale = Math.max(Math.abs(bias[from] - center), Math.abs(bias[to] - center), 1e-9);
  const p = degree + 3;
  // y about its mean (the constant column absorbs it; χ² as Σy² − bᵀcoef stays well conditioned).
  let yMean = 0;
  for (let i = from; i <= to; i++) yMean += y[i];
  yMean /= npts;
  // The polynomial's part of the normal equations is the same for every trial: once.
  const gram = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  let syy = 0;
  const xk = new Float64Array(degree + 1);
  const powers = (i: number) => {
    const x = (bias[i] - center) / scale;
    xk[0] = 1;
    for (let k = 1; k <= degree; k++) xk[k] = xk[k - 1] * x;
  };
  for (let i = from; i <= to; i++) {
    powers(i);
    const yi = y[i] - yMean;
    syy += yi * yi;
    for (let r = 0; r <= degree; r++) {
      rhs[r] += xk[r] * yi;
      for (let c = r; c <= degree; c++) gram[r * p + c] += xk[r] * xk[c];
    }
  }
  const solve = (q: number) => {
    const a = new Float64Array(q * q);
    for (let r = 0; r < q; r++) for (let c = 0; c < q; c++) a[r * q + c] = r <= c ? gram[r * p + c] : gram[c * p + r];
    const coef = solveLinear(a, rhs.subarray(0, q), q);
    if (!coef) return null;
    let fit = 0;
    for (let r = 0; r < q; r++) fit += coef[r] * rhs[r];
    return { coef, rss: Math.max(0, syy - fit) };
  };
  const rss0 = solve(degree + 1)?.rss;
  if (rss0 === undefined) return { from, to };
  const out = { from, to };
  const S = degree + 1; // the step's column; the kink's is S + 1
  for (const dir of [1, -1] as const) {
    let best: { rss: number; idx: number; coef: ArrayLike<number> } = { rss: Infinity, idx: -1, coef: [] };
    for (let t = 0; t < 16; t++) {
      // Trial edges from the middle of the region to 4 points before its end.
      const frac = 0.5 + (0.5 * t) / 16;
      const idx = dir === 1 ? from + Math.round(frac * (npts - 5)) : to - Math.round(frac * (npts - 5));
      const e = bias[idx];
      // The step's and the kink's entries: sums over the cut part only (both are zero elsewhere).
      for (let r = 0; r < p; r++) for (let c = S; c < p; c++) gram[r * p + c] = 0;
      rhs[S] = 0;
      rhs[S + 1] = 0;
      let nCut = 0;
      let cutSum = 0;
      for (let i = from; i <= to; i++) {
        const u = dir * (bias[i] - e);
        if (!(u > 0)) continue;
        const kink = u / scale;
        const yi = y[i] - yMean;
        powers(i);
        for (let r = 0; r <= degree; r++) {
          gram[r * p + S] += xk[r];
          gram[r * p + S + 1] += xk[r] * kink;
        }
        gram[S * p + S] += 1;
        gram[S * p + S + 1] += kink;
        gram[(S + 1) * p + S + 1] += kink * kink;
        rhs[S] += yi;
        rhs[S + 1] += kink * yi;
        nCut++;
        cutSum += yi;
      }
      const r = solve(p);
      if (!r) continue;
      // An onset rises away from the gap: a kink that bends down is not one; and the band lies above the
      // floor it leaves (a floor cut off a band's straight stretch is a convex corner seen from the band).
      if (r.coef[S + 1] <= 0) continue;
      // Means about yMean: the cut part above the kept part.
      if (!(nCut > 0 && nCut < npts && cutSum / nCut > -cutSum / (npts - nCut))) continue;
      if (r.rss < best.rss) best = { rss: r.rss, idx, coef: r.coef };
    }
    if (best.idx < 0) continue;
    let noise2 = sigma === null ? 0 : sigma * sigma * tau;
    if (sigma === null) {
      const e = bias[best.idx];
      const res = new Float64Array(npts);
      for (let i = from; i <= to; i++) {
        powers(i);
        let f = 0;
        for (let k = 0; k <= degree; k++) f += best.coef[k] * xk[k];
        const u = dir * (bias[i] - e);
        if (u > 0) f += best.coef[S] + (best.coef[S + 1] * u) / scale;
        res[i - from] = y[i] - yMean - f;
      }
      noise2 = (best.rss / Math.max(1, npts - degree - 3)) * autocorrelationTime(res).tau;
    }
    if (noise2 > 0 && (rss0 - best.rss) / noise2 > minDeltaChi2) {
      if (dir === 1) out.to = Math.max(out.from + 4, best.idx - 1);
      else out.from = Math.min(out.to - 4, best.idx + 1);
    }
  }
  return out;
}

/**
 * The robust baseline of the raw data over one region (the gap between the current edge estimates):
 * a polynomial of degree ≤ maxDegree (one degree per `widthPerDegree_V` of width and per 12 points),
 * refitted once without points beyond 3σ; σ, σ of the smoothed curve,
 * τ and ρ₁ from the residuals.
 */
export function fitBaselineOn(
  bias: Float64Array,
  y: Float64Array,
  s: Float64Array,
  gain: number,
  from: number,
  to: number,
  maxDegree: number,
  widthPerDegree_V: number,
): Baseline {
  const npts = to - from + 1;
  const width = bias[to] - bias[from];
  const allowed = Math.max(0, Math.min(maxDegree, Math.floor(width / widthPerDegree_V), Math.floor(npts / 12)));
  const center = 0.5 * (bias[from] + bias[to]);
  const res = new Float64Array(npts);
  const robust = (degree: number) => {
    const use = new Uint8Array(npts).fill(1);
    let coef: Float64Array = new Float64Array([median(y.subarray(from, to + 1))]);
    let sigma = 0;
    let rss = 0;
    for (let it = 0; it < 2; it++) {
      coef = polyFit(bias, y, from, to, degree, center, use) ?? coef;
      for (let i = from; i <= to; i++) res[i - from] = y[i] - baselineAt({ coef, center }, bias[i]);
      sigma = madSigma(res);
      let changed = false;
      rss = 0;
      for (let i = 0; i < npts; i++) {
        const u = Math.abs(res[i]) <= 3 * sigma ? 1 : 0;
        if (u) rss += res[i] * res[i];
        if (u !== use[i]) changed = true;
        use[i] = u;
      }
      if (!changed) break;
    }
    return { coef, sigma, rss };
  };
  // Degree by a penalised χ²: a higher degree must lower χ² (σ² per point, τ for correlation) by more
  // than DEGREE_PENALTY, so a slope or curve is used only where the data show it; a polynomial fitted
  // to noise would tilt the floor and move the edges when extrapolated.
  // The noise scale is that of the largest model (Mallows' Cp; common practice): the residuals of a
  // smaller model hold the slope or curve it misses, and judged by them a slope never pays.
  const fits = [robust(0)];
  for (let d = 1; d <= allowed; d++) fits.push(robust(d));
  const noiseOf = (f: { coef: Float64Array; sigma: number }) => {
    for (let i = from; i <= to; i++) res[i - from] = y[i] - baselineAt({ coef: f.coef, center }, bias[i]);
    return f.sigma * f.sigma * autocorrelationTime(res).tau;
  };
  let degree = 0;
  if (allowed >= 1) {
    const sig2 = noiseOf(fits[1]);
    if (fits[0].rss / sig2 > fits[1].rss / sig2 + DEGREE_PENALTY) degree = 1;
    if (allowed >= 2) {
      const sig2c = noiseOf(fits[0]);
      if (fits[degree].rss / sig2c + DEGREE_PENALTY * degree > fits[2].rss / sig2c + DEGREE_PENALTY * 2) degree = 2;
    }
  }
  const best = fits[degree];
  const { coef, sigma } = best;
  for (let i = from; i <= to; i++) res[i - from] = y[i] - baselineAt({ coef, center }, bias[i]);
  const rs = new Float64Array(npts);
  let iMin = from;
  for (let i = from; i <= to; i++) {
    rs[i - from] = s[i] - baselineAt({ coef, center }, bias[i]);
    if (rs[i - from] < rs[iMin - from]) iMin = i;
  }
  const { tau } = autocorrelationTime(res);
  return { coef, center, degree, sigma, sigmaSmoothed: Math.max(madSigma(rs), sigma * gain), tau, from, to, iMin };
}

/** χ² a baseline degree must earn (a 3σ-like level for one parameter, with room for non-Gaussian noise). */
const DEGREE_PENALTY = 12;

