/**
 * The decay constant κ from an I(z) curve: ln|I| against z is a line of slope −2κ where the current
 * tunnels (I ∝ exp(−2κz), one-dimensional WKB), and the apparent barrier height follows as
 * φ_ap = ħ²κ²/(2m_e) (barrierHeight_eV). The line is fitted over the exponential range only, found
 * robustly:
 *
 * 1. Sweeps. A curve whose z goes forth and back (one turning point) is an approach and a retraction,
 *    fitted apart; each sweep is sorted by z.
 * 2. Noise floor σ_f of the current amplifier, from the second differences of the farthest quarter of
 *    the sweep (at least 5 points): for independent noise, Var(I₋ − 2I₀ + I₊) = 6σ_f², and an
 *    exponential's own second difference is small there. Where the far end still decays, this
 *    overestimates σ_f, which only shortens the range.
 * 3. Saturation: three or more points within `saturationTolerance` of the largest |I|, the closest
 *    point among them, are the preamplifier's flat top; they, and points whose fitted current lies
 *    within 3σ_rel of that level (where noise would be clipped), are left out.
 * 4. A first line by Siegel's repeated median (breakdown point 50%: robust to a contact plateau or a
 *    floor taking up to half the points), then weighted least squares, iterated until the set of
 *    points stays the same. A point is on the exponential while the fitted current exceeds
 *    `floorK`·σ_f (selection on the model, not on the noisy value, so it does not bias the slope);
 *    its variance in ln|I| is σ_rel² + (σ_f/Î)², with σ_rel, the relative scatter, from the
 *    residuals; ln|I| is corrected by +½(σ_f/Î)² for the bias of a logarithm of a noisy value. Points
 *    at the close end off the line by more than `endTrimSigma` are a point contact (above: the current
 *    jumped) or saturation (below: it flattened); at the far end, the floor; inside, single outliers
 *    beyond `spikeSigma`. An amplifier offset, the median of the current less the line over the
 *    points in the floor (fitted current below 2σ_f), is subtracted when it differs from zero.
 * 5. κ = −slope/2, its standard uncertainty from the fit's covariance scaled by the residuals'
 *    reduced χ². With several sweeps, κ is their weighted mean, and the spread between them adds
 *    s²/N to its variance (s² their sample variance, N their number): for an approach and a
 *    retraction that is (Δκ/2)².
 *
 * The uncertainty takes the points as independent: noise correlated from point to point (1/f noise of
 * the junction, slow drift) makes it too small, which the approach–retraction spread then shows. The
 * z scale's calibration (often known to 5–10%) scales κ as a whole and is not included.
 */
import { ELECTRON_MASS_KG, ELEMENTARY_CHARGE_C, HBAR_J_S } from "../constants";
import { apparentBarrierHeight_eV } from "../distance";
import { linearLeastSquares, madSigma, median } from "../stats";
import { resolveBarrierFitOptions, type BarrierFitOptions } from "../settings";
import type { BarrierFlag } from "./flags";

/**
 * ħ²/(8 m_e e) in eV·Å²: φ_ap[eV] = this × (d ln I/dz [Å⁻¹])², from the CODATA 2018 constants
 * (constants.ts). The rule of thumb writes 0.952 (common practice).
 */
export const APPARENT_BARRIER_EV_ANGSTROM2 =
  ((HBAR_J_S * HBAR_J_S) / (8 * ELECTRON_MASS_KG * ELEMENTARY_CHARGE_C)) * 1e20;

/** Apparent barrier height φ_ap = ħ²κ²/(2m_e), eV, for κ in 1/nm (I ∝ exp(−2κz)). */
export function barrierHeightFromKappa_eV(kappa_per_nm: number): number {
  // d ln I/dz = −2κ, and φ = (ħ²/8m_e)(d ln I/dz)² = ħ²κ²/(2m_e).
  return apparentBarrierHeight_eV(2 * kappa_per_nm);
}

/** One I(z) curve as recorded: tip height (nm, negative = closer) and current (A), in recorded order. */
export interface ApproachCurve {
  z_nm: Float64Array;
  current_A: Float64Array;
}

/** Why a point is not in the fit (stored per point, in recorded order). */
export const POINT_STATUS = ["used", "floor", "saturation", "contact", "outlier"] as const;
export type PointStatus = (typeof POINT_STATUS)[number];
const USED = 0;
const FLOOR = 1;
const SATURATION = 2;
const CONTACT = 3;
const OUTLIER = 4;

export interface SweepFit {
  direction: "approach" | "retraction";
  /** Indices of the sweep's first and one-past-last points in the curve (recorded order). */
  from: number;
  to: number;
  kappa_per_nm: number;
  kappaSigma_per_nm: number;
  /** The fitted line: ln|I/A| = lnI0 + slope_per_nm · z. */
  lnI0: number;
  slope_per_nm: number;
  /** Sign of the current (the bias's). */
  sign: 1 | -1;
  noiseFloor_A: number;
  offset_A: number;
  /** Relative scatter σ_rel of the current about the exponential (rms). */
  relScatter: number;
  pointsUsed: number;
  /** z range of the points used, nm. */
  range_nm: [number, number];
  /** Decades of current the used range spans. */
  decades: number;
  /** Curvature of ln|I| in its standard errors, and the relative change of slope across the range. */
  curvature: { t: number; relSlopeChange: number };
  warnings: string[];
}

export interface BarrierFit {
  kappa_per_nm: number;
  kappaSigma_per_nm: number;
  barrierHeight_eV: number;
  barrierHeightSigma_eV: number;
  pointsUsed: number;
  sweeps: SweepFit[];
  /** Per point (recorded order): an index into POINT_STATUS. */
  status: Uint8Array;
  flags: BarrierFlag[];
  warnings: string[];
}

/** A curve that cannot be fitted, with a message saying why. */
export class BarrierFitError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "BarrierFitError";
  }
}

const pA = (a: number) => `${(a * 1e12).toPrecision(3)} pA`;
const nm = (z: number) => `${z.toFixed(3)} nm`;

/** Siegel's repeated-median line through (x, y), on at most `cap` points (evenly strided). */
function repeatedMedianLine(x: number[], y: number[], cap = 300): { a: number; b: number } {
  const stride = Math.max(1, Math.ceil(x.length / cap));
  const xs: number[] = [];
  const ys: number[] = [];
  for (let i = 0; i < x.length; i += stride) {
    xs.push(x[i]);
    ys.push(y[i]);
  }
  const m = xs.length;
  const inner = new Float64Array(m);
  const per: number[] = [];
  for (let i = 0; i < m; i++) {
    let k = 0;
    for (let j = 0; j < m; j++) if (j !== i && xs[j] !== xs[i]) inner[k++] = (ys[j] - ys[i]) / (xs[j] - xs[i]);
    if (k > 0) per.push(median(inner.subarray(0, k)));
  }
  const b = per.length ? median(per) : 0;
  return { a: median(ys.map((v, i) => v - b * xs[i])), b };
}

/** σ of the additive noise from the second differences of the farthest points (module note, 2). */
function floorSigma(I: number[]): number {
  const n = I.length;
  const q = Math.min(n, Math.max(5, Math.ceil(n / 4)));
  const far = I.slice(n - q);
  const d2: number[] = [];
  for (let k = 1; k < far.length - 1; k++) d2.push(far[k - 1] - 2 * far[k] + far[k + 1]);
  return d2.length ? madSigma(d2) / Math.sqrt(6) : 0;
}

/**
 * The amplifier's offset: the median of I − s·Î over the points in the floor (fitted current below
 * 2σ_f, where the line's extrapolation adds little; at least 5 of them), when it differs from zero
 * by more than 3 standard errors of a median (1.2533·σ_f/√m); else 0.
 */
function floorOffset(I: number[], model: number[], s: number, sf: number): number {
  const rest: number[] = [];
  for (let i = 0; i < I.length; i++) if (model[i] < 2 * sf) rest.push(I[i] - s * model[i]);
  if (rest.length < 5) return 0;
  const m = median(rest);
  return Math.abs(m) > (3 * 1.2533 * sf) / Math.sqrt(rest.length) ? m : 0;
}

/**
 * σ_rel from residuals r with their floor parts f = σ_f/Î: the mean of r² − f² over the half of the
 * points with the smallest f (where the floor matters least, so an error in σ_f matters least too).
 */
function relativeScatter(rf: [number, number][]): number {
  const sorted = [...rf].sort((p, q) => p[1] - q[1]);
  const half = sorted.slice(0, Math.max(3, Math.ceil(sorted.length / 2)));
  const excess = half.reduce((x, [r, f]) => x + r * r - f * f, 0);
  return Math.sqrt(Math.max(1e-8, excess / Math.max(1, half.length - 1)));
}

/** Where the points of `idx` lie, for a warning: "z ≥ 0.134 nm", "z from … to …", "z = …". */
function where(z: number[], idx: number[]): string {
  const zs = idx.map((i) => z[i]);
  const lo = Math.min(...zs);
  const hi = Math.max(...zs);
  return idx.length === 1 ? `z = ${nm(lo)}` : `z from ${nm(lo)} to ${nm(hi)}`;
}

/**
 * Fit one sweep. `order` holds the curve's indices of the sweep's points; `status` (whole curve) is
 * filled for them.
 */
function fitSweep(
  curve: ApproachCurve,
  order: number[],
  direction: SweepFit["direction"],
  o: BarrierFitOptions,
  status: Uint8Array,
): SweepFit {
  const idx = [...order].sort((p, q) => curve.z_nm[p] - curve.z_nm[q] || p - q);
  const n = idx.length;
  const z = idx.map((i) => curve.z_nm[i]);
  const I = idx.map((i) => curve.current_A[i]);
  if (n < o.minPoints) throw new BarrierFitError(`only ${n} points; a sweep needs at least ${o.minPoints}`);
  if (!(z[n - 1] > z[0]))
    throw new BarrierFitError(`z is constant (${z[0]} nm) over all ${n} points: the tip did not move`);
  let iMax = 0;
  for (let i = 1; i < n; i++) if (Math.abs(I[i]) > Math.abs(I[iMax])) iMax = i;
  const mainMax = Math.abs(I[iMax]);
  if (!(mainMax > 0)) throw new BarrierFitError("the current is zero at every point");
  const s: 1 | -1 = I[iMax] > 0 ? 1 : -1;
  const sf = Math.max(floorSigma(I), mainMax * 1e-9);
  if (mainMax < o.floorK * sf)
    throw new BarrierFitError(
      `the current never rises above the noise floor: its largest value is ${pA(mainMax)}, the floor's σ about ${pA(sf)}`,
    );
  let oppMax = 0;
  for (const v of I) oppMax = Math.max(oppMax, -s * v);
  if (oppMax > o.signChangeRatio * mainMax && oppMax > o.floorK * sf)
    throw new BarrierFitError(
      `the current changes sign: it reaches ${pA(s * mainMax)} and ${pA(-s * oppMax)}; at one bias an I(z) curve keeps one sign (check the bias and the amplifier's offset)`,
    );
  const satLevel = (1 - o.saturationTolerance) * mainMax;
  // A flat top where the tip is closest (the current's largest values are there).
  const saturated = s * I[0] >= satLevel && I.filter((v) => s * v >= satLevel).length >= 3;

  // First line: repeated median over the points clearly above the floor and below saturation.
  const cz: number[] = [];
  const cy: number[] = [];
  for (let i = 0; i < n; i++) {
    const v = s * I[i];
    if (v > 3 * sf && !(saturated && v >= satLevel)) {
      cz.push(z[i]);
      cy.push(Math.log(v));
    }
  }
  if (cz.length < o.minPoints)
    throw new BarrierFitError(
      `only ${cz.length} points stand clear of the noise floor (σ about ${pA(sf)}) and saturation; the fit needs ${o.minPoints}`,
    );
  let { a, b } = repeatedMedianLine(cz, cy);
  const r0 = cz.map((zz, k) => cy[k] - a - b * zz).filter((_, k) => Math.exp(a + b * cz[k]) > o.floorK * sf);
  let sRel = Math.max(r0.length >= 3 ? madSigma(r0) : 0.05, 1e-4);
  const code = new Uint8Array(n);
  let prev = "";
  let offset = 0;
  let fit: { cov: Float64Array; rss: number; used: number[]; y: Float64Array; w: Float64Array } | null = null;
  for (let iter = 0; iter < 40; iter++) {
    const model = z.map((zz) => Math.exp(a + b * zz));
    offset = floorOffset(I, model, s, sf);
    const y = new Float64Array(n);
    const w = new Float64Array(n);
    const t = new Float64Array(n);
    const inRange: number[] = [];
    code.fill(FLOOR);
    for (let i = 0; i < n; i++) {
      const v = s * (I[i] - offset);
      if (saturated && (s * I[i] >= satLevel || model[i] >= satLevel * (1 - 3 * sRel))) {
        code[i] = SATURATION;
        continue;
      }
      if (!(model[i] > o.floorK * sf) || !(v > 0)) continue;
      const f = sf / model[i];
      y[i] = Math.log(v) + 0.5 * f * f;
      const vy = sRel * sRel + f * f;
      w[i] = 1 / vy;
      t[i] = (y[i] - a - b * z[i]) * Math.sqrt(w[i]);
      inRange.push(i);
    }
    let lo = 0;
    let hi = inRange.length - 1;
    for (; lo <= hi && Math.abs(t[inRange[lo]]) > o.endTrimSigma; lo++)
      code[inRange[lo]] = t[inRange[lo]] > 0 ? CONTACT : SATURATION;
    for (; hi >= lo && Math.abs(t[inRange[hi]]) > o.endTrimSigma; hi--) code[inRange[hi]] = FLOOR;
    const used: number[] = [];
    for (let k = lo; k <= hi; k++) {
      const i = inRange[k];
      if (Math.abs(t[i]) > o.spikeSigma) code[i] = OUTLIER;
      else {
        code[i] = USED;
        used.push(i);
      }
    }
    if (used.length < o.minPoints) {
      const count = (c: number) => code.filter((x) => x === c).length;
      const why = [
        [count(FLOOR), "in the noise floor"],
        [count(SATURATION), `at a flat top of ${pA(s * mainMax)} (saturation)`],
        [count(CONTACT), "past a jump to point contact"],
        [count(OUTLIER), "off the line"],
      ]
        .filter(([k]) => (k as number) > 0)
        .map(([k, w]) => `${k} ${w}`)
        .join(", ");
      throw new BarrierFitError(
        `only ${used.length} points lie on an exponential (${why}; the floor's σ about ${pA(sf)}); the fit needs ${o.minPoints}`,
      );
    }
    const key = used.join(",");
    if (key === prev && fit) break;
    prev = key;
    const ls = linearLeastSquares(
      [used.map(() => 1), used.map((i) => z[i])],
      used.map((i) => y[i]),
      used.map((i) => w[i]),
    );
    if (!ls) throw new BarrierFitError("the points on the exponential do not determine a line");
    [a, b] = [ls.coef[0], ls.coef[1]];
    sRel = relativeScatter(used.map((i) => [y[i] - a - b * z[i], sf / Math.exp(a + b * z[i])]));
    fit = { cov: ls.cov, rss: ls.rss, used, y, w };
  }
  const { used, y, w } = fit!;
  const m = used.length;
  // Residual-scaled covariance with the final line's weights.
  let rss = 0;
  for (const i of used) rss += w[i] * (y[i] - a - b * z[i]) ** 2;
  const chi2 = rss / Math.max(1, m - 2);
  const sigmaB = Math.sqrt(fit!.cov[3] * chi2);
  const kappa = -b / 2;
  const kappaSigma = sigmaB / 2;
  if (!(kappa > 3 * kappaSigma) || !(kappa > 0.5)) {
    const slope = `d ln|I|/dz = ${b.toFixed(2)} ± ${sigmaB.toFixed(2)} per nm`;
    throw new BarrierFitError(
      b > 3 * sigmaB
        ? `the current grows as z increases (${slope}); Bandcross counts negative z as closer to the sample, as for z_offset_pm: check the sign of z`
        : `the current does not decay as the tip withdraws (${slope}): no exponential to fit`,
    );
  }
  // Curvature of ln|I| over the range: a quadratic term in its standard errors.
  const q = linearLeastSquares(
    [used.map(() => 1), used.map((i) => z[i]), used.map((i) => z[i] * z[i])],
    used.map((i) => y[i]),
    used.map((i) => w[i]),
  );
  const zr: [number, number] = [z[used[0]], z[used[m - 1]]];
  let curvature = { t: 0, relSlopeChange: 0 };
  if (q && m > 3) {
    const qc = q.coef[2];
    const qs = Math.sqrt(q.cov[8] * (q.rss / (m - 3)));
    curvature = { t: qs > 0 ? qc / qs : 0, relSlopeChange: Math.abs((2 * qc * (zr[1] - zr[0])) / b) };
  }
  // Which points were left out, in words.
  const warnings: string[] = [];
  const groups: [number, string][] = [
    [FLOOR, "in the noise floor"],
    [SATURATION, "at the preamplifier's saturation or where the current flattens"],
    [CONTACT, "past a jump to point contact"],
    [OUTLIER, "off the line (outliers)"],
  ];
  for (const [c, what] of groups) {
    const k = [...code.keys()].filter((i) => code[i] === c);
    if (k.length)
      warnings.push(`${direction}: ${k.length} point${k.length > 1 ? "s" : ""} ${what} left out (${where(z, k)})`);
  }
  if (offset !== 0)
    warnings.push(`${direction}: an amplifier offset of ${pA(offset)} subtracted (measured in the noise floor)`);
  idx.forEach((ci, k) => (status[ci] = code[k]));
  return {
    direction,
    from: Math.min(...order),
    to: Math.max(...order) + 1,
    kappa_per_nm: kappa,
    kappaSigma_per_nm: kappaSigma,
    lnI0: a,
    slope_per_nm: b,
    sign: s,
    noiseFloor_A: sf,
    offset_A: offset,
    relScatter: sRel,
    pointsUsed: m,
    range_nm: zr,
    decades: (-b * (zr[1] - zr[0])) / Math.LN10,
    curvature,
    warnings,
  };
}

/**
 * The sweeps of a curve: one, or an approach and a retraction when z goes forth and back with one
 * turning point (each side at least minPoints long and reaching half the z range).
 */
export function splitSweeps(
  z: Float64Array,
  minPoints: number,
): { order: number[]; direction: SweepFit["direction"] }[] {
  const n = z.length;
  let iMin = 0;
  let iMax = 0;
  for (let i = 1; i < n; i++) {
    if (z[i] < z[iMin]) iMin = i;
    if (z[i] > z[iMax]) iMax = i;
  }
  const range = z[iMax] - z[iMin];
  const span = (a: number, b: number) => Array.from({ length: b - a }, (_, k) => a + k);
  for (const turn of [iMin, iMax]) {
    if (turn + 1 < minPoints || n - turn - 1 < minPoints) continue;
    if (Math.abs(z[0] - z[turn]) < range / 2 || Math.abs(z[n - 1] - z[turn]) < range / 2) continue;
    const firstIn = turn === iMin;
    return [
      { order: span(0, turn + 1), direction: firstIn ? "approach" : "retraction" },
      { order: span(turn + 1, n), direction: firstIn ? "retraction" : "approach" },
    ];
  }
  return [{ order: span(0, n), direction: z[n - 1] < z[0] ? "approach" : "retraction" }];
}

/**
 * Fit κ to one I(z) curve (see the module note).
 * @throws BarrierFitError with a message for a curve that cannot give κ
 */
export function fitBarrier(curve: ApproachCurve, options?: Partial<BarrierFitOptions>): BarrierFit {
  const o = resolveBarrierFitOptions(options);
  const n = curve.z_nm.length;
  if (curve.current_A.length !== n)
    throw new BarrierFitError(`z has ${n} values but the current ${curve.current_A.length}`);
  for (let i = 0; i < n; i++)
    if (!Number.isFinite(curve.z_nm[i]) || !Number.isFinite(curve.current_A[i]))
      throw new BarrierFitError(`point ${i + 1} is not a finite number`);
  if (n < o.minPoints) throw new BarrierFitError(`only ${n} points; an I(z) curve needs at least ${o.minPoints}`);
  let zlo = Infinity;
  let zhi = -Infinity;
  for (const v of curve.z_nm) [zlo, zhi] = [Math.min(zlo, v), Math.max(zhi, v)];
  if (!(zhi > zlo)) throw new BarrierFitError(`z is constant (${zlo} nm) over all ${n} points: the tip did not move`);
  const status = new Uint8Array(n).fill(FLOOR);
  const parts = splitSweeps(curve.z_nm, o.minPoints);
  const sweeps: SweepFit[] = [];
  const warnings: string[] = [];
  const errors: string[] = [];
  for (const p of parts) {
    try {
      sweeps.push(fitSweep(curve, p.order, p.direction, o, status));
    } catch (e) {
      if (!(e instanceof BarrierFitError)) throw e;
      errors.push(parts.length > 1 ? `${p.direction}: ${e.message}` : e.message);
    }
  }
  if (sweeps.length === 0) throw new BarrierFitError(errors.join("; "));
  for (const e of errors) warnings.push(`${e} (that sweep is not used)`);
  for (const sw of sweeps) warnings.push(...sw.warnings);
  const combined = combineKappas(sweeps.map((sw) => ({ kappa_per_nm: sw.kappa_per_nm, kappaSigma_per_nm: sw.kappaSigma_per_nm })));
  const kappa = combined.kappa_per_nm;
  const kappaSigma = combined.kappaSigma_per_nm;
  const phi = combined.barrierHeight_eV;
  const flags = barrierFlags(sweeps, phi, o);
  return {
    kappa_per_nm: kappa,
    kappaSigma_per_nm: kappaSigma,
    barrierHeight_eV: phi,
    barrierHeightSigma_eV: combined.barrierHeightSigma_eV,
    pointsUsed: sweeps.reduce((x, sw) => x + sw.pointsUsed, 0),
    sweeps,
    status,
    flags,
    warnings,
  };
}

export interface KappaEstimate {
  kappa_per_nm: number;
  kappaSigma_per_nm: number;
}

/**
 * Several κ estimates (the sweeps of a curve, or the curves of a session or a tip) as one: the mean
 * with weights 1/σ², whose variance 1/Σw gets the spread between them added, s²/N (s² their sample
 * variance, N their number; for two, (Δκ/2)²), so estimates that disagree beyond their own σ widen
 * it. With φ_ap and its σ (2φ·σ_κ/κ, linear propagation).
 */
export function combineKappas(values: readonly KappaEstimate[]): KappaEstimate & { barrierHeight_eV: number; barrierHeightSigma_eV: number; n: number } {
  if (values.length === 0) throw new RangeError("no κ to combine");
  const w = values.map((v) => 1 / Math.max(v.kappaSigma_per_nm, 1e-12) ** 2);
  const wsum = w.reduce((x, v) => x + v, 0);
  const kappa = values.reduce((x, v, k) => x + w[k] * v.kappa_per_nm, 0) / wsum;
  const N = values.length;
  let variance = 1 / wsum;
  if (N > 1) variance += values.reduce((x, v) => x + (v.kappa_per_nm - kappa) ** 2, 0) / (N - 1) / N;
  const sigma = Math.sqrt(variance);
  const phi = barrierHeightFromKappa_eV(kappa);
  return { kappa_per_nm: kappa, kappaSigma_per_nm: sigma, barrierHeight_eV: phi, barrierHeightSigma_eV: (2 * phi * sigma) / kappa, n: N };
}

function barrierFlags(sweeps: SweepFit[], phi: number, o: BarrierFitOptions): BarrierFlag[] {
  const flags: BarrierFlag[] = [];
  const bent = sweeps.filter(
    (sw) => Math.abs(sw.curvature.t) > o.curvatureSigma && sw.curvature.relSlopeChange > o.curvatureRelSlope,
  );
  if (bent.length)
    flags.push({
      code: "not-exponential",
      message: bent
        .map(
          (sw) =>
            `${sw.direction}: the slope of ln|I| changes by ${(sw.curvature.relSlopeChange * 100).toFixed(0)}% across the fitted range (${sw.curvature.t.toFixed(1)} σ)`,
        )
        .join("; "),
    });
  const short = sweeps.filter((sw) => sw.decades < o.minDecades);
  if (short.length)
    flags.push({
      code: "short-range",
      message: short
        .map((sw) => `${sw.direction}: the fit spans ${sw.decades.toFixed(2)} decades of current`)
        .join("; "),
    });
  if (phi < o.barrierRange_eV[0] || phi > o.barrierRange_eV[1])
    flags.push({
      code: "unusual-barrier",
      message: `apparent barrier ${phi.toFixed(2)} eV, outside ${o.barrierRange_eV[0]}–${o.barrierRange_eV[1]} eV`,
    });
  if (sweeps.length === 2) {
    const [p, r] = sweeps;
    const d = Math.abs(p.kappa_per_nm - r.kappa_per_nm);
    const sd = Math.hypot(p.kappaSigma_per_nm, r.kappaSigma_per_nm);
    if (d > o.sweepsDisagreeSigma * sd)
      flags.push({
        code: "sweeps-disagree",
        message: `${p.direction} κ = ${p.kappa_per_nm.toFixed(2)}/nm and ${r.direction} κ = ${r.kappa_per_nm.toFixed(2)}/nm differ by ${(d / sd).toFixed(1)} σ`,
      });
  }
  const noisy = sweeps.filter((sw) => sw.relScatter > o.noisyRelScatter);
  if (noisy.length)
    flags.push({
      code: "noisy",
      message: noisy
        .map(
          (sw) => `${sw.direction}: the current scatters by ${(sw.relScatter * 100).toFixed(0)}% about the exponential`,
        )
        .join("; "),
    });
  return flags;
}
