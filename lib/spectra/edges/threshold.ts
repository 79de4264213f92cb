/**
 * Threshold edges (sustainedEdge) and the log-scale onset cross-check. An edge is the linear
 * interpolation of the crossing between the last point below the threshold and the first above.
 */

/**
 * Log-scale onset: fit ln(s − floor) against bias over the rising part of the onset — from the threshold
 * edge outward, the points above floor + σ, up to `span` points or until the signal exceeds 30σ above the
 * floor — and return where that line meets ln σ (the noise level). Null if under 4 usable points or the
 * line does not rise away from the gap.
 */
export function logOnset(bias: Float64Array, s: Float64Array, index: number, dir: 1 | -1, span: number, floor: number, sigma: number, lo: number, hi: number): number | null {
  let sx = 0, sy = 0, sxx = 0, sxy = 0, n = 0;
  for (let k = 0; k < span; k++) {
    const i = index + dir * k;
    if (i < lo || i > hi) break;
    const d = s[i] - floor;
    if (!(d > sigma)) continue;
    if (d > 30 * sigma && n >= 4) break;
    const x = bias[i];
    const ly = Math.log(d);
    sx += x; sy += ly; sxx += x * x; sxy += x * ly; n++;
  }
  if (n < 4) return null;
  const den = n * sxx - sx * sx;
  if (!(Math.abs(den) > 0)) return null;
  const beta = (n * sxy - sx * sy) / den;
  const alpha = (sy - beta * sx) / n;
  if (!(beta * dir > 0)) return null;
  return (Math.log(sigma) - alpha) / beta;
}

/**
 * Sustained threshold edge: walking outward from `start`, the first point from which the signal stays
 * above `thr` for `consecutive` points and then spends at least `share` of the next `span` points
 * above it (or of what is left of the range). A band keeps rising however noisy its first stretch is;
 * a slow noise excursion falls back below the threshold within its correlation length.
 * `dir` = 1 walks up in bias (conduction band), −1 down (valence band); `end` is the last index.
 */
export function sustainedEdge(bias: Float64Array, s: Float64Array, start: number, end: number, thr: number, consecutive: number, span: number, share: number, dir: 1 | -1): { edge: number; index: number } | null {
  const inRange = (i: number) => (dir === 1 ? i <= end : i >= end);
  for (let i = start + dir; inRange(i + dir * (consecutive - 1)); i += dir) {
    let ok = true;
    for (let j = 0; j < consecutive; j++) if (!(s[i + dir * j] > thr)) { ok = false; break; }
    if (!ok) continue;
    let above = 0;
    let count = 0;
    for (let j = 0; j < span && inRange(i + dir * j); j++, count++) if (s[i + dir * j] > thr) above++;
    if (above < share * count) continue;
    const prev = i - dir;
    const f = (thr - s[prev]) / (s[i] - s[prev]);
    return { edge: bias[prev] + Math.min(1, Math.max(0, f)) * (bias[i] - bias[prev]), index: i };
  }
  return null;
}
