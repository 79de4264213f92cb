/**
 * Repeats at one point averaged into one spectrum with the standard error of the mean at every bias.
 *
 * Steps:
 * 1. The members must be repeats of one point: setpoints within `SETPOINT_REL_TOLERANCE` (bias and
 *    current) and positions within `POSITION_TOLERANCE_nm`; otherwise PrepareError names the two that
 *    differ. Their axes go on a common axis (axis.ts): a different bias range is refused.
 * 2. An odd repeat out (a tip change between sweeps: the apex picked up or lost an atom) is found by a
 *    leave-one-out variance ratio. For member i and the others O (m of them, mean ȳ_O):
 *      F_i = mean_V (y_i − ȳ_O)² / [s²_O · (1 + 1/m)],
 *    s²_O = Σ_{j∈O} Σ_V (y_j − ȳ_O)² / (n(m − 1)), the others' own scatter. When every repeat is the
 *    same curve plus noise of one variance, (y_i − ȳ_O) has variance σ²(1 + 1/m) and s²_O estimates σ²,
 *    so F_i ≈ 1 (an F(n, n(m − 1)) variate for white noise), whatever the curve, the noise level or its
 *    units: no noise model is needed, the repeats are their own reference. Its standard error is about
 *    √(2τ/n · (1 + 1/(m − 1))), τ the integrated autocorrelation time of the others' residuals
 *    (correlated noise has fewer independent points; common practice). A member is left out when
 *    F_i > max(1.5, 1 + 6 standard errors): six standard errors, so that noise alone practically never
 *    leaves a repeat out, and 1.5, a difference that matters (the same limits as `compareRepeats`).
 *    The member with the largest ratio is left out first and the test repeats on the rest, while three or more remain
 *    (with two, neither can be called the odd one). Members the user put back (`include`) stay in.
 *    A ratio rather than a distance to a median: the others' scatter holds any outlier among them, so a
 *    good repeat is not pushed over the limit by an odd one in its reference.
 * 3. Mean and standard error of the mean, s/√m with s the sample standard deviation (m − 1) of the
 *    repeats used at that bias. The current is averaged the same way when every member has one.
 */
import { autocorrelationTime } from "../edges/baseline";
import type { SpectrumMeta } from "../import/types";
import { commonAxis, onAxis } from "./axis";
import { PrepareError } from "./errors";

/** Setpoints of repeats agree within 1% (bias and current): the feedback set to the same values (common practice). */
export const SETPOINT_REL_TOLERANCE = 0.01;
/**
 * Positions of repeats agree within 0.1 nm: drift over the minutes a set of repeats takes at low
 * temperature is usually below that (common practice), and it is well below a tip's lateral resolution
 * for spectroscopy.
 */
export const POSITION_TOLERANCE_nm = 0.1;

export interface AverageMember {
  bias_V: ArrayLike<number>;
  didv: ArrayLike<number>;
  current_A?: ArrayLike<number> | null;
  meta?: Pick<SpectrumMeta, "setpoint_bias_V" | "setpoint_current_A" | "x_nm" | "y_nm">;
  label?: string;
}

export interface LeftOutMember {
  /** Index into the members given. */
  index: number;
  label: string;
  /** Leave-one-out variance ratio F of this member at the round it was left out, and the limit it exceeded. */
  statistic: number;
  limit: number;
  reason: string;
}

export interface AveragedSpectrum {
  bias_V: Float64Array;
  didv: Float64Array;
  /** Standard error of the mean at each bias (0 where one repeat only). */
  stderr: Float64Array;
  current_A: Float64Array | null;
  /** Indices of the members averaged, ascending. */
  averagedFrom: number[];
  leftOut: LeftOutMember[];
  warnings: string[];
}

export interface AverageOptions {
  /** Members never left out (put back by the user). */
  include?: number[];
  /** Run the odd-repeat test (default true). */
  outlierTest?: boolean;
}

const pct = (a: number, b: number) => (Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b))) * 100;

/** Refuses members that are not repeats of one point (PrepareError with the reason). */
export function assertSamePoint(members: AverageMember[]): void {
  const name = (i: number) => members[i].label ?? `spectrum ${i + 1}`;
  const m0 = members[0].meta ?? {};
  for (let i = 1; i < members.length; i++) {
    const m = members[i].meta ?? {};
    for (const [key, what, unit, scale] of [
      ["setpoint_bias_V", "setpoint bias", "mV", 1e3],
      ["setpoint_current_A", "setpoint current", "pA", 1e12],
    ] as const) {
      const a = m0[key];
      const b = m[key];
      if (a === undefined && b === undefined) continue;
      if (a === undefined || b === undefined)
        throw new PrepareError(`${what} known for ${a === undefined ? name(i) : name(0)} only: not repeats of one setpoint`);
      if (pct(a, b) > SETPOINT_REL_TOLERANCE * 100)
        throw new PrepareError(
          `different setpoints: ${what} ${(a * scale).toPrecision(4)} ${unit} (${name(0)}) and ` +
            `${(b * scale).toPrecision(4)} ${unit} (${name(i)}) differ by ${pct(a, b).toFixed(1)}%, ` +
            `more than ${SETPOINT_REL_TOLERANCE * 100}%`,
        );
    }
    const p0 = m0.x_nm !== undefined && m0.y_nm !== undefined;
    const p = m.x_nm !== undefined && m.y_nm !== undefined;
    if (p0 !== p) throw new PrepareError(`position known for ${p0 ? name(0) : name(i)} only: not repeats of one point`);
    if (p0 && p) {
      const d = Math.hypot(m.x_nm! - m0.x_nm!, m.y_nm! - m0.y_nm!);
      if (d > POSITION_TOLERANCE_nm)
        throw new PrepareError(
          `different positions: ${name(0)} and ${name(i)} are ${d.toFixed(2)} nm apart, ` +
            `more than ${POSITION_TOLERANCE_nm} nm`,
        );
    }
  }
}

interface Round {
  index: number;
  statistic: number;
  limit: number;
}

/** The candidate in `set` with the largest leave-one-out ratio, when it exceeds its limit (see the head of the file). */
function oddOneOut(ys: Float64Array[], set: number[], candidates: number[]): Round | null {
  const n = ys[0].length;
  const m = set.length - 1;
  const total = new Float64Array(n);
  const squares = new Float64Array(n);
  for (const j of set)
    for (let v = 0; v < n; v++) {
      total[v] += ys[j][v];
      squares[v] += ys[j][v] * ys[j][v];
    }
  // F of every candidate (cheap), then the limit of the largest: its τ needs the others' residuals.
  let top = -1;
  let topF = -Infinity;
  for (const i of candidates) {
    let dd = 0;
    let scatter = 0;
    for (let v = 0; v < n; v++) {
      const mean = (total[v] - ys[i][v]) / m;
      dd += (ys[i][v] - mean) ** 2;
      scatter += squares[v] - ys[i][v] * ys[i][v] - m * mean * mean;
    }
    const s2 = scatter / (n * (m - 1));
    if (!(s2 > 0)) continue;
    const f = dd / n / (s2 * (1 + 1 / m));
    if (f > topF) {
      topF = f;
      top = i;
    }
  }
  if (top < 0) return null;
  // τ of the others' residuals about their own mean (noise only, under the hypothesis).
  const res = new Float64Array(n);
  const taus: number[] = [];
  for (const j of set) {
    if (j === top) continue;
    for (let v = 0; v < n; v++) res[v] = ys[j][v] - (total[v] - ys[top][v]) / m;
    taus.push(autocorrelationTime(res).tau);
  }
  taus.sort((a, b) => a - b);
  const tau = taus[taus.length >> 1];
  const limit = Math.max(1.5, 1 + 6 * Math.sqrt(((2 * tau) / n) * (1 + 1 / (m - 1))));
  return topF > limit ? { index: top, statistic: topF, limit } : null;
}

export function averageSpectra(members: AverageMember[], options: AverageOptions = {}): AveragedSpectrum {
  if (members.length < 2) throw new PrepareError("an average needs two spectra or more");
  assertSamePoint(members);
  const axis = commonAxis(members);
  const warnings = [...axis.warnings];
  const ys = members.map((m) => onAxis(axis, m.bias_V, m.didv));
  const name = (i: number) => members[i].label ?? `spectrum ${i + 1}`;
  const forced = new Set(options.include ?? []);
  const set = members.map((_, i) => i);
  const leftOut: LeftOutMember[] = [];
  if (options.outlierTest !== false) {
    if (members.length === 2)
      warnings.push("two repeats: neither can be told to be the odd one, so both are averaged as they are");
    while (set.length >= 3) {
      const odd = oddOneOut(
        ys,
        set,
        set.filter((i) => !forced.has(i)),
      );
      if (!odd) break;
      set.splice(set.indexOf(odd.index), 1);
      leftOut.push({
        ...odd,
        label: name(odd.index),
        reason:
          `${name(odd.index)} differs from the other repeats beyond their noise (variance ratio ` +
          `${odd.statistic.toFixed(2)}, limit ${odd.limit.toFixed(2)}): the tip may have changed; left out`,
      });
    }
  }
  for (const l of leftOut) warnings.push(l.reason);
  for (const i of forced) if (i < members.length) warnings.push(`${name(i)} kept in the average by hand`);
  const n = axis.bias_V.length;
  const m = set.length;
  const mean = new Float64Array(n);
  const stderr = new Float64Array(n);
  for (const j of set) for (let v = 0; v < n; v++) mean[v] += ys[j][v] / m;
  for (const j of set) for (let v = 0; v < n; v++) stderr[v] += (ys[j][v] - mean[v]) ** 2;
  for (let v = 0; v < n; v++) stderr[v] = m > 1 ? Math.sqrt(stderr[v] / (m - 1) / m) : 0;
  let current: Float64Array | null = null;
  if (set.every((j) => members[j].current_A)) {
    current = new Float64Array(n);
    for (const j of set) {
      const c = onAxis(axis, members[j].bias_V, members[j].current_A!);
      for (let v = 0; v < n; v++) current[v] += c[v] / m;
    }
  }
  return { bias_V: axis.bias_V, didv: mean, stderr, current_A: current, averagedFrom: [...set].sort((a, b) => a - b), leftOut, warnings };
}
