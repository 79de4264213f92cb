/**
 * Repeats at one point: spectra taken one after another at the same place and setpoint should agree
 * to within their noise. Two repeats that do not have changed in between: a tip change (the apex
 * picked up or lost an atom: the whole curve or its edges move) or drift (the tip height or the
 * lock-in offset wandered: a slow difference with the same edges).
 *
 * Test for each pair: the mean square of their difference against the sum of their noise variances,
 * R = mean((y₁ − y₂)²) / (σ₁² + σ₂²), which is 1 for repeats that differ by noise only. With n points
 * of noise with integrated autocorrelation time τ, R has a standard error of about √(2τ/n) (a χ²
 * with n/τ degrees of freedom; common practice), so a pair differs when R > 1 + 6√(2τ/n) and R > 1.5
 * (a difference that matters, not only one that can be seen). Repeats that agree form groups; more
 * than one group flags every repeat, saying which ones differ. A difference whose slow part (a moving
 * average over a tenth of the sweep) carries most of it, with edges that agree, is drift; otherwise
 * a tip change.
 */
import type { GapPick } from "./pick";
import type { QualityFlag } from "./flags";

export interface RepeatInput {
  bias_V: ArrayLike<number>;
  didv: ArrayLike<number>;
  pick: Pick<GapPick, "status" | "vbEdge_V" | "cbEdge_V" | "vbSigma_V" | "cbSigma_V" | "noiseSigma" | "signInverted">;
  /** Integrated autocorrelation time of the noise (1 when unknown). */
  tau?: number;
  label?: string;
}

function onAxis(bias: ArrayLike<number>, x: ArrayLike<number>, y: ArrayLike<number>): Float64Array {
  const out = new Float64Array(bias.length);
  let j = 0;
  for (let i = 0; i < bias.length; i++) {
    const b = bias[i];
    while (j < x.length - 2 && x[j + 1] < b) j++;
    const t = (b - x[j]) / (x[j + 1] - x[j]);
    out[i] = y[j] + Math.min(1, Math.max(0, t)) * (y[j + 1] - y[j]);
  }
  return out;
}

/** Flags for each repeat (empty lists when they agree); the repeats are compared on the first one's axis. */
export function compareRepeats(repeats: RepeatInput[]): QualityFlag[][] {
  const k = repeats.length;
  const out: QualityFlag[][] = repeats.map(() => []);
  if (k < 2) return out;
  const bias = repeats[0].bias_V;
  const n = bias.length;
  const ys = repeats.map((r, i) => {
    const y = i === 0 ? Float64Array.from(r.didv) : onAxis(bias, r.bias_V, r.didv);
    if (r.pick.signInverted) for (let j = 0; j < y.length; j++) y[j] = -y[j];
    return y;
  });
  const sig = repeats.map((r) => r.pick.noiseSigma ?? NaN);
  if (!sig.every((s) => s > 0)) return out;
  const tau = Math.max(1, ...repeats.map((r) => r.tau ?? 1));
  const parent = Array.from({ length: k }, (_, i) => i);
  const find = (i: number): number => (parent[i] === i ? i : (parent[i] = find(parent[i])));
  const ratio: number[][] = repeats.map(() => new Array<number>(k).fill(1));
  const slowShare: number[][] = repeats.map(() => new Array<number>(k).fill(0));
  const limit = Math.max(1.5, 1 + 6 * Math.sqrt((2 * tau) / n));
  const w = Math.max(3, Math.round(n / 10));
  for (let a = 0; a < k; a++)
    for (let b = a + 1; b < k; b++) {
      const d = new Float64Array(n);
      let ss = 0;
      for (let i = 0; i < n; i++) {
        d[i] = ys[a][i] - ys[b][i];
        ss += d[i] * d[i];
      }
      const r = ss / n / (sig[a] ** 2 + sig[b] ** 2);
      ratio[a][b] = ratio[b][a] = r;
      if (r <= limit) parent[find(a)] = find(b);
      else {
        // The slow part of the difference: its moving average over a tenth of the sweep.
        const cum = new Float64Array(n + 1);
        for (let i = 0; i < n; i++) cum[i + 1] = cum[i] + d[i];
        let slow = 0;
        for (let i = 0; i < n; i++) {
          const lo = Math.max(0, i - w);
          const hi = Math.min(n, i + w + 1);
          slow += ((cum[hi] - cum[lo]) / (hi - lo)) ** 2;
        }
        slowShare[a][b] = slowShare[b][a] = slow / ss;
      }
    }
  const groups = new Map<number, number[]>();
  for (let i = 0; i < k; i++) groups.set(find(i), [...(groups.get(find(i)) ?? []), i]);
  if (groups.size < 2) return out;
  const name = (i: number) => repeats[i].label ?? `repeat ${i + 1}`;
  const edgesAgree = (a: number, b: number) => {
    const pa = repeats[a].pick;
    const pb = repeats[b].pick;
    if (pa.status !== "ok" || pb.status !== "ok") return pa.status === pb.status;
    const tol = (x: number | null, y: number | null) => 3 * Math.hypot(x ?? 0, y ?? 0);
    return Math.abs(pa.vbEdge_V! - pb.vbEdge_V!) <= tol(pa.vbSigma_V, pb.vbSigma_V) && Math.abs(pa.cbEdge_V! - pb.cbEdge_V!) <= tol(pa.cbSigma_V, pb.cbSigma_V);
  };
  for (let i = 0; i < k; i++) {
    const others = [...groups.values()].filter((g) => !g.includes(i)).flat();
    const worst = others.reduce((m, j) => (ratio[i][j] > ratio[i][m] ? j : m), others[0]);
    const drift = others.every((j) => slowShare[i][j] > 0.5 && edgesAgree(i, j));
    out[i].push({
      code: drift ? "drift" : "tip-change",
      message: `${name(i)} differs from ${others.map(name).join(", ")} beyond the noise (mean square difference ${ratio[i][worst].toFixed(1)}× the noise)${drift ? ": a slow change with the same edges (drift)" : ": the tip may have changed between them"}.`,
    });
  }
  return out;
}
