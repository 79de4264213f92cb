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
import { interpolateOnto, movingAverage } from "../stats";
import type { GapPick } from "./pick";
import type { QualityFlag } from "./flags";
import type { SpectrumMeta } from "../import/types";
import { declaredRepeats } from "../prepare/points";

export interface RepeatInput {
  bias_V: ArrayLike<number>;
  didv: ArrayLike<number>;
  pick: Pick<GapPick, "status" | "vbEdge_V" | "cbEdge_V" | "vbSigma_V" | "cbSigma_V" | "noiseSigma" | "signInverted">;
  /** Integrated autocorrelation time of the noise (1 when unknown). */
  tau?: number;
  label?: string;
}

/** Flags for each repeat (empty lists when they agree); the repeats are compared on the first one's axis. */
export function compareRepeats(repeats: RepeatInput[]): QualityFlag[][] {
  const k = repeats.length;
  const out: QualityFlag[][] = repeats.map(() => []);
  if (k < 2) return out;
  const bias = repeats[0].bias_V;
  const n = bias.length;
  const ys = repeats.map((r, i) => {
    const y = i === 0 ? Float64Array.from(r.didv) : interpolateOnto(bias, r.bias_V, r.didv);
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
        let slow = 0;
        for (const v of movingAverage(d, w)) slow += v * v;
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

/**
 * Which spectra of one file are repeats at one point: those that share a position (x_nm, y_nm within
 * 1 pm) and a setpoint (bias and current within 0.1%), or — with no positions — the points of a file
 * whose metadata says `# repeats: N` (N consecutive columns each; every spectrum of the file sharing a
 * setpoint when the columns are not a whole number of points). Groups of two or more, as indices.
 * A grid or a line (different positions) has none.
 */
export function repeatGroups(metas: Pick<SpectrumMeta, "x_nm" | "y_nm" | "setpoint_bias_V" | "setpoint_current_A" | "extra">[]): number[][] {
  const close = (a: number | undefined, b: number | undefined, rel: number, abs: number) =>
    a === undefined || b === undefined ? a === b : Math.abs(a - b) <= Math.max(abs, rel * Math.max(Math.abs(a), Math.abs(b)));
  const same = (a: (typeof metas)[number], b: (typeof metas)[number]) =>
    close(a.x_nm, b.x_nm, 0, 1e-3) && close(a.y_nm, b.y_nm, 0, 1e-3) && close(a.setpoint_bias_V, b.setpoint_bias_V, 1e-3, 0) && close(a.setpoint_current_A, b.setpoint_current_A, 1e-3, 0);
  const groups: number[][] = [];
  const positioned = metas.every((m) => m.x_nm !== undefined && m.y_nm !== undefined);
  const declared = metas.length > 1 && metas.every((m) => declaredRepeats(m) !== undefined);
  if (!positioned && !declared) return groups;
  if (!positioned) {
    // `# repeats: N`: N consecutive columns per point (prepare/points.ts), when the file holds whole points.
    const n = Number(declaredRepeats(metas[0]));
    if (Number.isInteger(n) && n >= 2 && metas.length % n === 0)
      return Array.from({ length: metas.length / n }, (_, p) => Array.from({ length: n }, (_, k) => p * n + k));
  }
  const taken = new Array<boolean>(metas.length).fill(false);
  for (let i = 0; i < metas.length; i++) {
    if (taken[i]) continue;
    const g = [i];
    for (let j = i + 1; j < metas.length; j++) if (!taken[j] && same(metas[i], metas[j])) g.push(j);
    if (g.length > 1) {
      for (const j of g) taken[j] = true;
      groups.push(g);
    }
  }
  return groups;
}
