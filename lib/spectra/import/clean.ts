/**
 * Clean-up of one bias axis and the value columns that share it: drop rows with missing values, put the
 * bias in ascending order, average repeated bias values, resample a non-uniform axis onto a uniform one
 * (linear interpolation at the median step). Every change leaves a warning; unusable data throws.
 */
import { ImportError } from "./types";
import { interpolateOnto, median } from "../stats";

export interface Cleaned {
  bias: Float64Array;
  cols: Float64Array[];
  warnings: string[];
}

function lineList(lines: number[]): string {
  return lines.length <= 5 ? lines.join(", ") : `${lines.slice(0, 5).join(", ")} and ${lines.length - 5} more`;
}

export function cleanAxis(biasIn: Float64Array, colsIn: Float64Array[], lines: Int32Array | null, minPoints: number, maxPoints: number): Cleaned {
  const warnings: string[] = [];
  const n0 = biasIn.length;
  const keep: number[] = [];
  const dropped: number[] = [];
  for (let i = 0; i < n0; i++) {
    let ok = !Number.isNaN(biasIn[i]);
    for (const c of colsIn) if (Number.isNaN(c[i])) { ok = false; break; }
    if (ok) keep.push(i);
    else dropped.push(lines ? lines[i] : i + 1);
  }
  if (dropped.length) warnings.push(`dropped ${dropped.length} row${dropped.length > 1 ? "s" : ""} with missing values (${lines ? "line" : "point"}${dropped.length > 1 ? "s" : ""} ${lineList(dropped)})`);
  let n = keep.length;
  if (n < minPoints) throw new ImportError(`only ${n} usable point${n === 1 ? "" : "s"}; a spectrum needs at least ${minPoints}`);
  let bias = dropped.length ? Float64Array.from(keep, (i) => biasIn[i]) : biasIn;
  let cols = dropped.length ? colsIn.map((c) => Float64Array.from(keep, (i) => c[i])) : colsIn;
  let lo = Infinity;
  let hi = -Infinity;
  for (const b of bias) {
    if (b < lo) lo = b;
    if (b > hi) hi = b;
  }
  if (!(hi > lo)) throw new ImportError(`the bias is constant (${lo} V) over all ${n} points`);
  let asc = true;
  let desc = true;
  for (let i = 1; i < n; i++) {
    if (!(bias[i] > bias[i - 1])) asc = false;
    if (!(bias[i] < bias[i - 1])) desc = false;
  }
  if (!asc) {
    if (desc) {
      bias = Float64Array.from(bias).reverse();
      cols = cols.map((c) => Float64Array.from(c).reverse());
      warnings.push("bias was descending; reversed to ascending order");
    } else {
      const idx = Array.from({ length: n }, (_, i) => i).sort((a, b) => bias[a] - bias[b] || a - b);
      const b0 = bias;
      bias = Float64Array.from(idx, (i) => b0[i]);
      cols = cols.map((c) => Float64Array.from(idx, (i) => c[i]));
      // Average exact repeats.
      const tol = (hi - lo) * 1e-9;
      const ub: number[] = [];
      const uc: number[][] = cols.map(() => []);
      let repeats = 0;
      for (let i = 0; i < n; ) {
        let j = i + 1;
        while (j < n && bias[j] - bias[i] <= tol) j++;
        let sb = 0;
        for (let k = i; k < j; k++) sb += bias[k];
        ub.push(sb / (j - i));
        cols.forEach((c, ci) => {
          let s = 0;
          for (let k = i; k < j; k++) s += c[k];
          uc[ci].push(s / (j - i));
        });
        repeats += j - i - 1;
        i = j;
      }
      if (repeats) warnings.push(`bias not monotonic; sorted, and ${repeats} repeated bias value${repeats > 1 ? "s" : ""} averaged`);
      else warnings.push("bias not monotonic; sorted to ascending order");
      bias = Float64Array.from(ub);
      cols = uc.map((c) => Float64Array.from(c));
      n = bias.length;
      if (n < minPoints) throw new ImportError(`only ${n} distinct bias values; a spectrum needs at least ${minPoints}`);
    }
  }
  // Uniform axis?
  const d = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) d[i - 1] = bias[i] - bias[i - 1];
  const step = median(d);
  let dev = 0;
  for (const x of d) dev = Math.max(dev, Math.abs(x - step));
  if (dev > 0.01 * step) {
    const m = Math.round((bias[n - 1] - bias[0]) / step) + 1;
    if (m > maxPoints) throw new ImportError(`resampling the non-uniform bias axis would need ${m} points (limit ${maxPoints})`);
    const nb = new Float64Array(m);
    const h = (bias[n - 1] - bias[0]) / (m - 1);
    for (let i = 0; i < m; i++) nb[i] = bias[0] + i * h;
    const ncols = cols.map((c) => interpolateOnto(nb, bias, c));
    warnings.push(`non-uniform bias axis (steps vary by up to ${((dev / step) * 100).toFixed(0)}%); resampled to ${m} points at ${(h * 1000).toPrecision(3)} mV by linear interpolation`);
    bias = nb;
    cols = ncols;
  }
  return { bias, cols, warnings };
}
