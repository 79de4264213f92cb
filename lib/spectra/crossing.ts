/**
 * Critical field from a gap-versus-field sweep.
 *
 * Models, both fitted by weighted least squares with effective variances σᵢ² = σ_gap,ᵢ² + (sᵢ·σ_E,ᵢ)²
 * (sᵢ the model's slope at the point; iterated), so both error bars count (J. Orear, Am. J. Phys. 50,
 * 912 (1982)):
 *   V-shape:  Δ(E) = a₁·(E_c − E)  for E < E_c,   a₂·(E − E_c)  for E ≥ E_c    (a₁, a₂ ≥ 0; 3 parameters)
 *   line:     Δ(E) = p + q·E                                                      (monotonic; 2 parameters)
 * E_c is found by profiling χ²(E_c) (a₁, a₂ solved for each trial E_c); its 95% interval is where
 * χ²(E_c) − χ²_min ≤ 3.84 × max(1, χ²_min/(n − 3)) (profile likelihood, inflated when the scatter exceeds
 * the error bars). The models are compared by the Bayesian information criterion χ² + k·ln n.
 *
 * States: `crossed` — the V is preferred by ΔBIC ≥ minDeltaBic, both slopes differ from zero by
 * minSlopeSignificance standard errors, at least minPointsPerSide points lie on each side of E_c and the
 * interval is closed. `closing` — not crossed, but the gap shrinks significantly as |E| grows; the line's
 * zero is the extrapolated field. `none` — neither. A sweep whose gap only shrinks has no rising branch, so
 * it can never pass the a₂ test and is never `crossed`.
 *
 * The field-model uncertainty is common to every point of a sweep (a scale error): pass it as
 * `systematicFieldRelSigma`; it widens `ci95Total_V_per_nm`, not the statistical `ci95_V_per_nm`.
 */
import { resolveCrossingOptions, type CrossingOptions } from "./settings";
import { invert, linearLeastSquares, median } from "./stats";

export interface CrossingPoint {
  field_V_per_nm: number;
  fieldSigma_V_per_nm: number;
  gap_eV: number;
  gapSigma_eV: number;
}

export interface ModelScore {
  chi2: number;
  k: number;
  bic: number;
  aic: number;
}

export interface CrossingFit {
  state: "crossed" | "closing" | "none";
  found: boolean;
  /** Critical field (crossed only), V/nm. */
  field_V_per_nm: number | null;
  /** Statistical 95% interval given the field model (crossed only). */
  ci95_V_per_nm: [number, number] | null;
  /** The same widened by the field model's common scale uncertainty. */
  ci95Total_V_per_nm: [number, number] | null;
  /** dΔ/dE below and above E_c, eV per (V/nm), with standard errors (crossed only). */
  slopes: { below: number; above: number; belowSigma: number; aboveSigma: number } | null;
  /** Field where the monotonic line reaches zero gap (closing only), V/nm. */
  extrapolated_V_per_nm: number | null;
  /** The best V-shape regardless of state (for display and diagnosis). */
  vFit: { field_V_per_nm: number; below: number; above: number; nBelow: number; nAbove: number } | null;
  line: { intercept_eV: number; slope: number; slopeSigma: number } | null;
  comparison: { vShape: ModelScore; line: ModelScore; preferred: "v-shape" | "line"; deltaBic: number } | null;
  curve: { field: number[]; gap: number[]; lo: number[]; hi: number[] };
  n: number;
  reasons: string[];
}

const MIN_SIGMA = 1e-4; // eV: a floor on each gap's σ so that one point cannot dominate

interface VSolution {
  chi2: number;
  a1: number;
  a2: number;
  cov: Float64Array; // 2×2 for (a1, a2); NaN where a slope is fixed at 0
}

function solveV(E: Float64Array, g: Float64Array, sg: Float64Array, sE: Float64Array, ec: number): VSolution {
  const n = E.length;
  const c1 = new Float64Array(n);
  const c2 = new Float64Array(n);
  let nb = 0;
  let na = 0;
  for (let i = 0; i < n; i++) {
    c1[i] = Math.max(0, ec - E[i]);
    c2[i] = Math.max(0, E[i] - ec);
    if (E[i] < ec) nb++;
    else na++;
  }
  let a1 = 0;
  let a2 = 0;
  let cov = new Float64Array([NaN, NaN, NaN, NaN]);
  const w = new Float64Array(n);
  for (let it = 0; it < 4; it++) {
    for (let i = 0; i < n; i++) {
      const s = E[i] < ec ? a1 : a2;
      w[i] = 1 / (sg[i] * sg[i] + s * s * sE[i] * sE[i]);
    }
    const use1 = nb > 0;
    const use2 = na > 0 && E.some((e) => e > ec);
    const cols: Float64Array[] = [];
    if (use1) cols.push(c1);
    if (use2) cols.push(c2);
    if (cols.length === 0) break;
    let r = linearLeastSquares(cols, g, w);
    if (!r) break;
    let k = 0;
    a1 = use1 ? r.coef[k++] : 0;
    a2 = use2 ? r.coef[k++] : 0;
    // Non-negative slopes: refit the other alone when one comes out negative.
    if (a1 < 0 || a2 < 0) {
      const keep = a1 < 0 ? (use2 ? c2 : null) : use1 ? c1 : null;
      a1 = 0;
      a2 = 0;
      if (keep) {
        r = linearLeastSquares([keep], g, w);
        if (r && r.coef[0] > 0) {
          if (keep === c1) a1 = r.coef[0];
          else a2 = r.coef[0];
        }
      }
      cov = new Float64Array([NaN, NaN, NaN, NaN]);
    } else if (cols.length === 2) cov = Float64Array.from(r.cov);
    else cov = use1 ? new Float64Array([r.cov[0], NaN, NaN, NaN]) : new Float64Array([NaN, NaN, NaN, r.cov[0]]);
  }
  let chi2 = 0;
  for (let i = 0; i < n; i++) {
    const m = E[i] < ec ? a1 * (ec - E[i]) : a2 * (E[i] - ec);
    chi2 += w[i] * (g[i] - m) ** 2;
  }
  return { chi2, a1, a2, cov };
}

function solveLine(E: Float64Array, g: Float64Array, sg: Float64Array, sE: Float64Array) {
  const n = E.length;
  const ones = new Float64Array(n).fill(1);
  const w = new Float64Array(n);
  let q = 0;
  let r = null as ReturnType<typeof linearLeastSquares>;
  for (let it = 0; it < 4; it++) {
    for (let i = 0; i < n; i++) w[i] = 1 / (sg[i] * sg[i] + q * q * sE[i] * sE[i]);
    r = linearLeastSquares([ones, E], g, w);
    if (!r) return null;
    q = r.coef[1];
  }
  return r ? { p: r.coef[0], q: r.coef[1], cov: r.cov, chi2: r.rss } : null;
}

/**
 * Fit the critical field of a sweep.
 * @param points field (V/nm) and gap (eV), each with its σ
 * @param options overrides of DEFAULT_CROSSING_OPTIONS
 */
export function fitCrossing(points: CrossingPoint[], options?: Partial<CrossingOptions>): CrossingFit {
  const opt = resolveCrossingOptions(options);
  const pts = points.filter((p) => [p.field_V_per_nm, p.gap_eV].every(Number.isFinite)).sort((a, b) => a.field_V_per_nm - b.field_V_per_nm);
  const n = pts.length;
  const reasons: string[] = [];
  const empty: CrossingFit = {
    state: "none",
    found: false,
    field_V_per_nm: null,
    ci95_V_per_nm: null,
    ci95Total_V_per_nm: null,
    slopes: null,
    extrapolated_V_per_nm: null,
    vFit: null,
    line: null,
    comparison: null,
    curve: { field: [], gap: [], lo: [], hi: [] },
    n,
    reasons,
  };
  if (n < 4) {
    reasons.push(`${n} usable point${n === 1 ? "" : "s"}; at least 4 are needed`);
    return empty;
  }
  const E = Float64Array.from(pts, (p) => p.field_V_per_nm);
  const g = Float64Array.from(pts, (p) => p.gap_eV);
  const sg = Float64Array.from(pts, (p) => Math.max(Number.isFinite(p.gapSigma_eV) ? p.gapSigma_eV : 0, MIN_SIGMA));
  const sE = Float64Array.from(pts, (p) => (Number.isFinite(p.fieldSigma_V_per_nm) ? Math.max(0, p.fieldSigma_V_per_nm) : 0));
  const eMin = E[0];
  const eMax = E[n - 1];
  const range = Math.max(eMax - eMin, 1e-9);
  const lineFit = solveLine(E, g, sg, sE);
  // Profile χ²(E_c) on a grid, then refine.
  const gridLo = eMin - 0.5 * range;
  const gridHi = eMax + 0.5 * range;
  const M = 801;
  const gridE = new Float64Array(M);
  const gridChi = new Float64Array(M);
  let ib = 0;
  for (let j = 0; j < M; j++) {
    gridE[j] = gridLo + ((gridHi - gridLo) * j) / (M - 1);
    gridChi[j] = solveV(E, g, sg, sE, gridE[j]).chi2;
    if (gridChi[j] < gridChi[ib]) ib = j;
  }
  let ec = gridE[ib];
  {
    let a = gridE[Math.max(0, ib - 1)];
    let b = gridE[Math.min(M - 1, ib + 1)];
    for (let it = 0; it < 60; it++) {
      const m1 = a + (b - a) / 3;
      const m2 = b - (b - a) / 3;
      if (solveV(E, g, sg, sE, m1).chi2 < solveV(E, g, sg, sE, m2).chi2) b = m2;
      else a = m1;
    }
    const c = (a + b) / 2;
    if (solveV(E, g, sg, sE, c).chi2 <= gridChi[ib]) ec = c;
  }
  const best = solveV(E, g, sg, sE, ec);
  const nBelow = pts.filter((p) => p.field_V_per_nm < ec).length;
  const nAbove = n - nBelow;
  const dof = Math.max(1, n - 3);
  const inflate = Math.max(1, best.chi2 / dof);
  const level = best.chi2 + 3.841458820694124 * inflate; // χ²₁ 95% quantile
  // Interval: walk the profile outward from the minimum.
  const prof = (x: number) => solveV(E, g, sg, sE, x).chi2;
  const findCross = (dir: 1 | -1): number | null => {
    let x0 = ec;
    const h = range / 400;
    for (let k = 1; k <= 4000; k++) {
      const x1 = ec + dir * k * h;
      if (x1 < gridLo - range || x1 > gridHi + range) return null;
      if (prof(x1) > level) {
        let a = x0;
        let b = x1;
        for (let it = 0; it < 40; it++) {
          const m = (a + b) / 2;
          if (prof(m) > level) b = m;
          else a = m;
        }
        return (a + b) / 2;
      }
      x0 = x1;
    }
    return null;
  };
  const ciLo = findCross(-1);
  const ciHi = findCross(1);
  const s1 = Math.sqrt(best.cov[0] * inflate);
  const s2 = Math.sqrt(best.cov[3] * inflate);
  const vScore: ModelScore = { chi2: best.chi2, k: 3, bic: best.chi2 + 3 * Math.log(n), aic: best.chi2 + 6 };
  const lScore: ModelScore = lineFit
    ? { chi2: lineFit.chi2, k: 2, bic: lineFit.chi2 + 2 * Math.log(n), aic: lineFit.chi2 + 4 }
    : { chi2: Infinity, k: 2, bic: Infinity, aic: Infinity };
  const deltaBic = lScore.bic - vScore.bic;
  const comparison = { vShape: vScore, line: lScore, preferred: (deltaBic > 0 ? "v-shape" : "line") as "v-shape" | "line", deltaBic };
  const lineSigmaQ = lineFit ? Math.sqrt(lineFit.cov[3] * Math.max(1, lineFit.chi2 / Math.max(1, n - 2))) : NaN;
  const out: CrossingFit = {
    ...empty,
    vFit: { field_V_per_nm: ec, below: -best.a1, above: best.a2, nBelow, nAbove },
    line: lineFit ? { intercept_eV: lineFit.p, slope: lineFit.q, slopeSigma: lineSigmaQ } : null,
    comparison,
  };
  // Decide.
  const sig1 = best.a1 / s1;
  const sig2 = best.a2 / s2;
  if (deltaBic < opt.minDeltaBic) reasons.push(`V-shape not clearly preferred over a line (ΔBIC = ${deltaBic.toFixed(1)} < ${opt.minDeltaBic})`);
  if (nBelow < opt.minPointsPerSide || nAbove < opt.minPointsPerSide)
    reasons.push(`${nBelow} point(s) below and ${nAbove} above the best crossing; ${opt.minPointsPerSide} needed on each side`);
  if (!(sig1 >= opt.minSlopeSignificance)) reasons.push("no significant closing branch below the crossing");
  if (!(sig2 >= opt.minSlopeSignificance)) reasons.push("no significant reopening branch above the crossing");
  if (ciLo === null || ciHi === null) reasons.push("the 95% interval is not closed within the data");
  const crossed = reasons.length === 0;
  let curveModel: (x: number) => number;
  let curveSigma: (x: number) => number;
  if (crossed) {
    out.state = "crossed";
    out.found = true;
    out.field_V_per_nm = ec;
    out.ci95_V_per_nm = [ciLo!, ciHi!];
    const sys = 1.959963984540054 * opt.systematicFieldRelSigma * Math.abs(ec);
    out.ci95Total_V_per_nm = [ec - Math.hypot(ec - ciLo!, sys), ec + Math.hypot(ciHi! - ec, sys)];
    out.slopes = { below: -best.a1, above: best.a2, belowSigma: s1, aboveSigma: s2 };
    // Parameter covariance of (E_c, a₁, a₂), (JᵀWJ)⁻¹ at the optimum, for the drawn band.
    const w = Float64Array.from(pts, (_, i) => {
      const s = E[i] < ec ? best.a1 : best.a2;
      return 1 / (sg[i] ** 2 + s * s * sE[i] ** 2);
    });
    const model = (p: number[], x: number) => (x < p[0] ? p[1] * (p[0] - x) : p[2] * (x - p[0]));
    const p0 = [ec, best.a1, best.a2];
    // Gauss–Newton normal matrix JᵀWJ (the Hessian of χ²/2 at the optimum).
    const H = new Float64Array(9);
    for (let i = 0; i < n; i++) {
      const below = E[i] < ec;
      const J = below ? [best.a1, ec - E[i], 0] : [-best.a2, 0, E[i] - ec];
      for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) H[r * 3 + c] += w[i] * J[r] * J[c];
    }
    const C = invert(H, 3);
    curveModel = (x) => model(p0, x);
    curveSigma = (x) => {
      if (!C) return 0;
      const J = x < ec ? [best.a1, ec - x, 0] : [-best.a2, 0, x - ec];
      let v = 0;
      for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) v += J[r] * C[r * 3 + c] * J[c];
      return Math.sqrt(Math.max(0, v * inflate));
    };
  } else {
    const meanE = E.reduce((a, b) => a + b, 0) / n;
    const shrinking = lineFit !== null && lineFit.q * Math.sign(meanE || 1) < 0 && Math.abs(lineFit.q) / lineSigmaQ >= opt.minSlopeSignificance;
    if (shrinking) {
      out.state = "closing";
      out.extrapolated_V_per_nm = -lineFit!.p / lineFit!.q;
    }
    const lf = lineFit ?? { p: 0, q: 0, cov: new Float64Array(4), chi2: 0 };
    const li = Math.max(1, lf.chi2 / Math.max(1, n - 2));
    curveModel = (x) => Math.max(0, lf.p + lf.q * x);
    curveSigma = (x) => Math.sqrt(Math.max(0, (lf.cov[0] + 2 * x * lf.cov[1] + x * x * lf.cov[3]) * li));
  }
  // Curve across the data, extended to the crossing or the extrapolated zero when nearby.
  let c0 = eMin;
  let c1 = eMax;
  const target = out.field_V_per_nm ?? out.extrapolated_V_per_nm;
  if (target !== null && Number.isFinite(target) && target > eMin - range && target < eMax + range) {
    c0 = Math.min(c0, target);
    c1 = Math.max(c1, target);
  }
  const K = opt.curvePoints;
  for (let j = 0; j < K; j++) {
    const x = c0 + ((c1 - c0) * j) / (K - 1);
    const y = curveModel(x);
    const s = 1.959963984540054 * curveSigma(x);
    out.curve.field.push(x);
    out.curve.gap.push(y);
    out.curve.lo.push(Math.max(0, y - s));
    out.curve.hi.push(y + s);
  }
  return out;
}

/**
 * Fit a sweep whose points carry their field estimate with its model uncertainty. That uncertainty
 * (work functions, contact distance) is shared by every spectrum of a sweep, a scale error: it goes
 * into `systematicFieldRelSigma` (the median relative σ of the points) and widens the total interval,
 * rather than weighting points against each other. Used by the `sweep` command and the web app alike.
 */
export function fitSweep(
  points: { field_V_per_nm: number; fieldSigma_V_per_nm: number | null; gap_eV: number; gapSigma_eV: number | null }[],
  options?: Partial<CrossingOptions>,
): CrossingFit {
  return fitCrossing(
    points.map((p) => ({ field_V_per_nm: p.field_V_per_nm, fieldSigma_V_per_nm: 0, gap_eV: p.gap_eV, gapSigma_eV: p.gapSigma_eV ?? 0 })),
    { systematicFieldRelSigma: modelFieldRelSigma(points), ...options },
  );
}

/**
 * The field model's uncertainty shared by a sweep's points, relative to the field: the median of
 * σ/|E| over the points that have one (0 when none has). The fit takes it as a scale error, and the
 * phase plot draws it once.
 */
export function modelFieldRelSigma(points: readonly { field_V_per_nm: number; fieldSigma_V_per_nm: number | null }[]): number {
  const rel = points.filter((p) => p.field_V_per_nm !== 0 && p.fieldSigma_V_per_nm != null).map((p) => p.fieldSigma_V_per_nm! / Math.abs(p.field_V_per_nm));
  return rel.length ? median(rel) : 0;
}
