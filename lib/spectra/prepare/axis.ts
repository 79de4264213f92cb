/**
 * A common bias axis for spectra to be averaged. Axes that span the same range and differ only by
 * their sampling (another step or number of points) are put on one axis: the overlap of the ranges at
 * the coarsest step (never finer than the data, so no point is invented between two measured ones),
 * each spectrum interpolated linearly onto it, with a warning. Ranges whose ends differ by more than
 * that coarsest step are different measurements and are refused.
 */
import { interpolateOnto } from "../stats";
import { PrepareError } from "./errors";

export interface AxisMember {
  bias_V: ArrayLike<number>;
  label?: string;
}

export interface CommonAxis {
  bias_V: Float64Array;
  /** True when every member already lies on this axis (no interpolation needed). */
  identical: boolean;
  warnings: string[];
}

function medianStep(x: ArrayLike<number>): number {
  const d: number[] = [];
  for (let i = 1; i < x.length; i++) d.push(x[i] - x[i - 1]);
  d.sort((a, b) => a - b);
  return d.length ? d[d.length >> 1] : NaN;
}

const mV = (v: number) => `${(v * 1000).toFixed(1)} mV`;

export function commonAxis(members: AxisMember[]): CommonAxis {
  if (members.length === 0) throw new PrepareError("no spectra to put on a common axis");
  const first = members[0].bias_V;
  const sameAxis = (x: ArrayLike<number>) => {
    if (x.length !== first.length) return false;
    for (let i = 0; i < x.length; i++) if (Math.abs(x[i] - first[i]) > 1e-9 * Math.max(1, Math.abs(x[i]))) return false;
    return true;
  };
  if (members.every((m) => sameAxis(m.bias_V))) return { bias_V: new Float64Array(first), identical: true, warnings: [] };
  const steps = members.map((m) => medianStep(m.bias_V));
  if (!steps.every((s) => s > 0)) throw new PrepareError("every spectrum needs an ascending bias axis of two points or more");
  const step = Math.max(...steps);
  const lo = members.map((m) => m.bias_V[0]);
  const hi = members.map((m) => m.bias_V[m.bias_V.length - 1]);
  const name = (i: number) => members[i].label ?? `spectrum ${i + 1}`;
  for (let i = 1; i < members.length; i++)
    if (Math.abs(lo[i] - lo[0]) > step * 1.001 || Math.abs(hi[i] - hi[0]) > step * 1.001)
      throw new PrepareError(
        `different bias ranges: ${name(0)} spans ${mV(lo[0])} to ${mV(hi[0])}, ${name(i)} ${mV(lo[i])} to ${mV(hi[i])}` +
          ` (they may differ by one step, ${mV(step)}, at most)`,
      );
  const from = Math.max(...lo);
  const to = Math.min(...hi);
  const n = Math.floor((to - from) / step + 1e-9) + 1;
  const bias = new Float64Array(n);
  for (let i = 0; i < n; i++) bias[i] = from + i * step;
  return {
    bias_V: bias,
    identical: false,
    warnings: [
      `bias axes differ in sampling (steps ${[...new Set(steps.map((s) => mV(s)))].join(", ")}); ` +
        `put on a common axis from ${mV(from)} to ${mV(to)} in steps of ${mV(step)} by linear interpolation`,
    ],
  };
}

/** y on the common axis (a copy when the axis is the member's own). */
export function onAxis(axis: CommonAxis, bias_V: ArrayLike<number>, y: ArrayLike<number>): Float64Array {
  return axis.identical ? new Float64Array(y) : interpolateOnto(axis.bias_V, bias_V, y);
}
