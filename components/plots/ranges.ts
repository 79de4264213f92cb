/**
 * Axis ranges and ticks computed once and used both by the static preview of a plot and by the
 * Plotly figure that replaces it, so the two line up.
 */

/**
 * The smallest range holding every finite value, widened by `pad` of its span on each side (a
 * zero span gets ±0.5, or ±5% of the value). `includeZero` stretches it to reach zero first.
 */
export function paddedRange(
  values: Iterable<number>,
  { pad = 0.05, includeZero = false }: { pad?: number; includeZero?: boolean } = {},
): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (lo > hi) return null;
  if (includeZero) {
    lo = Math.min(lo, 0);
    hi = Math.max(hi, 0);
  }
  const span = hi - lo;
  if (span === 0) {
    const half = lo === 0 ? 0.5 : Math.abs(lo) * 0.05;
    return [lo - half, hi + half];
  }
  return [includeZero && lo === 0 ? 0 : lo - pad * span, includeZero && hi === 0 ? 0 : hi + pad * span];
}

/**
 * Tick positions at a step of 1, 2 or 5 × 10^k (common practice for linear axes) giving about
 * `target` ticks inside [lo, hi], rounded to the step's decimals so labels print cleanly.
 */
export function niceTicks(lo: number, hi: number, target = 6): number[] {
  if (!(hi > lo) || !Number.isFinite(lo) || !Number.isFinite(hi)) return [];
  const raw = (hi - lo) / Math.max(1, target);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  const ticks: number[] = [];
  for (let k = Math.ceil(lo / step - 1e-9); k * step <= hi + 1e-9 * step; k++)
    ticks.push(Number((k * step).toFixed(decimals)));
  return ticks;
}
