/**
 * Broadening-aware refinement of band edges.
 *
 * Near a conduction-band edge E_c the unbroadened signal is modelled as
 *   g(V) = b + [a + c·(V − E_c) + q·(V − E_c)²]·H(V − E_c)
 * (a floor b, a step a and a rise; H the unit step), mirrored for a valence-band edge. Convolved with the
 * known thermal ⊗ lock-in kernel K this stays linear in (b, a, c, q):
 *   K∗H = K₁(x),  K∗(tH) = x·K₁(x) − M₁(x),  K∗(t²H) = x²K₁ − 2xM₁ + M₂   (x = V − E_c)
 * with K's running moments (resolution.ts). So for every trial edge the linear parameters come from a
 * weighted least-squares solve, and the edge itself from a one-dimensional search of the residual sum of
 * squares (variable projection): a grid scan followed by golden-section refinement. The fit is made to
 * the raw (unsmoothed) data. Its standard error comes from the curvature of χ²(E) at the minimum
 * (Δχ² = 1 with the noise σ from the quiet region). When the two edges lie within a few resolutions of
 * each other both are fitted together (one floor, two onsets), alternating the two searches.
 */
import { type BroadeningKernel, convolvedOnset } from "../resolution";
import { brentMinimize, goldenMinimize, solveInPlace } from "../stats";

export interface EdgeFitInput {
  bias: Float64Array;
  y: Float64Array;
  kernel: BroadeningKernel;
  vbGuess: number;
  cbGuess: number;
  /** Noise σ of the raw data. */
  sigma: number;
  /** Integrated autocorrelation time of the noise (1 = white); χ² differences are divided by it. */
  tau?: number;
  resolution_V: number;
  step_V: number;
  bandWindow_V: number;
  /** Index range that may be used, inclusive. */
  lo: number;
  hi: number;
}

export interface EdgeFitResult {
  vb: number;
  cb: number;
  vbSigma: number;
  cbSigma: number;
  mode: "separate" | "joint";
  /** Joint fits: χ²(gap forced to 0) − χ²_min (2 parameters fewer: compare with χ²₂, 5.99 at 95%). */
  closedDeltaChi2: number | null;
  /**
   * Joint fits: σ of the gap from its profile likelihood — (upper 95% bound − estimate)/1.96, where the
   * bound is the gap at which χ², minimised over the midgap, rises by 3.84. Robust where the two edges
   * are strongly correlated or the gap sits at zero.
   */
  gapSigmaProfile: number | null;
  warnings: string[];
}

type Side = "vb" | "cb";

/** Basis columns for one onset at edge e over indices [i0, i1]. */
function onsetColumns(bias: Float64Array, i0: number, i1: number, e: number, side: Side, kern: BroadeningKernel, quad: boolean, out?: Float64Array[]): Float64Array[] {
  const n = i1 - i0 + 1;
  const s0 = out ? out[0] : new Float64Array(n);
  const s1 = out ? out[1] : new Float64Array(n);
  const s2 = quad ? (out ? out[2] : new Float64Array(n)) : null;
  const o = new Float64Array(3);
  for (let i = 0; i < n; i++) {
    const v = bias[i0 + i];
    const x = side === "cb" ? v - e : e - v;
    convolvedOnset(kern, x, o);
    s0[i] = o[0];
    s1[i] = o[1];
    if (s2) s2[i] = o[2];
  }
  return s2 ? [s0, s1, s2] : [s0, s1];
}

const MAXP = 8;
const scratchA = new Float64Array(MAXP * MAXP);
const scratchB = new Float64Array(MAXP);
const work = new Float64Array(MAXP * MAXP);
const workB = new Float64Array(MAXP);

/** Solve the sub-system of (A, b) (p×p, row-major) restricted to `use`; returns bᵀx, or NaN if singular. */
function solveSub(p: number, use: boolean[], x: Float64Array): number {
  const idx: number[] = [];
  for (let i = 0; i < p; i++) if (use[i]) idx.push(i);
  const m = idx.length;
  for (let r = 0; r < m; r++) {
    for (let c = 0; c < m; c++) work[r * m + c] = scratchA[idx[r] * p + idx[c]];
    workB[r] = scratchB[idx[r]];
  }
  if (!solveInPlace(work, workB, m, 1e-13)) return NaN;
  for (let r = 0; r < m; r++) x[idx[r]] = workB[r];
  let bx = 0;
  for (let r = 0; r < m; r++) bx += scratchB[idx[r]] * x[idx[r]];
  for (let i = 0; i < p; i++) if (!use[i]) x[i] = 0;
  return bx;
}

function dot(a: Float64Array, b: Float64Array, n: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) s += a[i] * b[i];
  return s;
}

/**
 * Residual sum of squares of the least-squares fit of y by the columns, RSS = yᵀy − bᵀx (normal
 * equations, no allocation). A physical onset does not step down: step coefficients (indices in
 * `stepCol`) that come out negative are fixed at zero and the rest refitted.
 */
function rssOf(cols: Float64Array[], y: Float64Array, stepCol: number[]): number {
  const p = cols.length;
  const n = y.length;
  // Column by column: each entry is one dot product over two typed arrays (the loop V8 compiles
  // best; a row-by-row sweep through p arrays ran about twice as long).
  const yy = dot(y, y, n);
  for (let r = 0; r < p; r++) {
    const xr = cols[r];
    scratchB[r] = dot(xr, y, n);
    for (let c = r; c < p; c++) scratchA[r * p + c] = scratchA[c * p + r] = dot(xr, cols[c], n);
  }
  const use = new Array<boolean>(p).fill(true);
  const x = new Float64Array(p);
  let bx = solveSub(p, use, x);
  let again = false;
  for (const c of stepCol) if (x[c] < 0) { use[c] = false; again = true; }
  if (again) bx = solveSub(p, use, x);
  if (!Number.isFinite(bx)) return Infinity;
  return Math.max(0, yy - bx);
}

/** Minimise f over [a, b]: grid scan with `n` points, then golden-section around the best cell. */
function scanMinimize(f: (x: number) => number, a: number, b: number, n: number, tol: number): { x: number; fx: number; atBound: boolean } {
  let best = a;
  let fb = Infinity;
  let ib = 0;
  const dx = (b - a) / (n - 1);
  for (let i = 0; i < n; i++) {
    const x = a + i * dx;
    const v = f(x);
    if (v < fb) {
      fb = v;
      best = x;
      ib = i;
    }
  }
  const g = brentMinimize(f, Math.max(a, best - dx), Math.min(b, best + dx), tol);
  const res = g.fx <= fb ? g : { x: best, fx: fb };
  return { ...res, atBound: ib === 0 || ib === n - 1 };
}

/** σ of the minimiser from χ² curvature: σ = √(2 / χ²''), χ² = RSS/σ². */
function curvatureSigma(f: (x: number) => number, x: number, h: number, sigma: number): number {
  const f0 = f(x);
  const fp = f(x + h);
  const fm = f(x - h);
  const d2 = (fp - 2 * f0 + fm) / (h * h) / (sigma * sigma);
  return d2 > 0 ? Math.sqrt(2 / d2) : NaN;
}

function indexRange(bias: Float64Array, from: number, to: number, lo: number, hi: number): [number, number] {
  let i0 = lo;
  while (i0 < hi && bias[i0] < from) i0++;
  let i1 = hi;
  while (i1 > lo && bias[i1] > to) i1--;
  return [i0, i1];
}

export function fitEdges(inp: EdgeFitInput): EdgeFitResult | null {
  const { bias, y, kernel, vbGuess, cbGuess, sigma, resolution_V: res, step_V: step, bandWindow_V: W, lo, hi } = inp;
  const tau = Math.max(1, inp.tau ?? 1);
  const warnings: string[] = [];
  const tol = Math.min(step, res) / 50;
  // Thermal tails (∝ e^(−x/k_BT)) can push the threshold edge into the gap by several k_BT; lock-in
  // and a weak onset push it outward. Search both ways generously.
  const kT = (kernel.T_K * 8.617333262e-5);
  const below = 2 * res + 6 * step; // search inward of the threshold edge
  const beyond = res + 3 * step + 8 * kT; // and outward
  const gapThr = cbGuess - vbGuess;
  const joint = gapThr < 4 * res + 10 * step;
  if (!joint) {
    const mid = (vbGuess + cbGuess) / 2;
    const fitOne = (side: Side): { e: number; s: number } | null => {
      const guess = side === "cb" ? cbGuess : vbGuess;
      const from = side === "cb" ? Math.max(mid, guess - 2 * W) : guess - W;
      const to = side === "cb" ? guess + W : Math.min(mid, guess + 2 * W);
      const [i0, i1] = indexRange(bias, from, to, lo, hi);
      if (i1 - i0 + 1 < 8) return null;
      const yy = y.subarray(i0, i1 + 1);
      const nw = i1 - i0 + 1;
      const ones = new Float64Array(nw).fill(1);
      const buf = [new Float64Array(nw), new Float64Array(nw), new Float64Array(nw)];
      const cols = [ones, ...buf];
      const f = (e: number) => {
        onsetColumns(bias, i0, i1, e, side, kernel, true, buf);
        return rssOf(cols, yy, [1]);
      };
      const a = side === "cb" ? Math.max(mid, guess - below) : guess - beyond;
      const b = side === "cb" ? guess + beyond : Math.min(mid, guess + below);
      if (!(b > a)) return null;
      let m = scanMinimize(f, a, b, 9, tol);
      if (m.atBound) {
        // The threshold edge can sit further out than expected (a weak onset in strong noise): widen once.
        const a2 = side === "cb" ? Math.max(mid, a - below) : a - beyond;
        const b2 = side === "cb" ? b + beyond : Math.min(mid, b + below);
        m = scanMinimize(f, a2, b2, 41, tol);
      }
      if (!Number.isFinite(m.fx)) return null;
      if (m.atBound) warnings.push(`${side === "cb" ? "conduction" : "valence"}-band edge fit reached its search limit`);
      return { e: m.x, s: curvatureSigma(f, m.x, Math.max(step / 2, res / 10), sigma) };
    };
    const v = fitOne("vb");
    const c = fitOne("cb");
    if (!v || !c) return null;
    return { vb: v.e, cb: c.e, vbSigma: v.s, cbSigma: c.s, mode: "separate", closedDeltaChi2: null, gapSigmaProfile: null, warnings };
  }
  // Joint fit: one floor, two onsets.
  const [i0, i1] = indexRange(bias, vbGuess - W, cbGuess + W, lo, hi);
  if (i1 - i0 + 1 < 10) return null;
  const yy = y.subarray(i0, i1 + 1);
  const ones = new Float64Array(i1 - i0 + 1).fill(1);
  // Coarse 2-D grid (the two edges are correlated when close), then alternating golden refinement.
  const G = 15;
  const vA = vbGuess - beyond;
  const vB = vbGuess + below;
  const cA = cbGuess - below;
  const cB = cbGuess + beyond;
  const vGrid = Array.from({ length: G }, (_, i) => vA + ((vB - vA) * i) / (G - 1));
  const cGrid = Array.from({ length: G }, (_, i) => cA + ((cB - cA) * i) / (G - 1));
  const vColsGrid = vGrid.map((e) => onsetColumns(bias, i0, i1, e, "vb", kernel, false));
  const cColsGrid = cGrid.map((e) => onsetColumns(bias, i0, i1, e, "cb", kernel, false));
  let vb = vbGuess;
  let cb = cbGuess;
  let bestRss = Infinity;
  for (let a = 0; a < G; a++)
    for (let b = 0; b < G; b++) {
      if (cGrid[b] < vGrid[a]) continue;
      const r = rssOf([ones, ...vColsGrid[a], ...cColsGrid[b]], yy, [1, 3]);
      if (r < bestRss) {
        bestRss = r;
        vb = vGrid[a];
        cb = cGrid[b];
      }
    }
  if (!Number.isFinite(bestRss)) return null;
  // Scratch columns, written in place by every evaluation below (these loops call the model hundreds
  // of times; fresh arrays each time were a tenth of the picking time in garbage collection).
  const nw = i1 - i0 + 1;
  const buffers = () => [new Float64Array(nw), new Float64Array(nw)];
  const vCols = onsetColumns(bias, i0, i1, vb, "vb", kernel, false, buffers());
  const cCols = onsetColumns(bias, i0, i1, cb, "cb", kernel, false, buffers());
  const vTry = buffers();
  const cTry = buffers();
  const cols5 = [ones, vCols[0], vCols[1], cCols[0], cCols[1]];
  /** RSS with the valence onset at `ev` and the conduction onset at `ec` (null: the current edge's columns). */
  const rssAt = (ev: number | null, ec: number | null) => {
    const v = ev === null ? vCols : onsetColumns(bias, i0, i1, ev, "vb", kernel, false, vTry);
    const c = ec === null ? cCols : onsetColumns(bias, i0, i1, ec, "cb", kernel, false, cTry);
    cols5[1] = v[0];
    cols5[2] = v[1];
    cols5[3] = c[0];
    cols5[4] = c[1];
    return rssOf(cols5, yy, [1, 3]);
  };
  const fV = (e: number) => (e > cb ? Infinity : rssAt(e, null));
  const fC = (e: number) => (e < vb ? Infinity : rssAt(null, e));
  const dv = (vB - vA) / (G - 1);
  const dc = (cB - cA) / (G - 1);
  for (let round = 0; round < 4; round++) {
    const mv = goldenMinimize(fV, vb - dv, Math.min(cb, vb + dv), tol);
    if (Number.isFinite(mv.fx) && mv.fx <= fV(vb)) vb = mv.x;
    onsetColumns(bias, i0, i1, vb, "vb", kernel, false, vCols);
    const mc = goldenMinimize(fC, Math.max(vb, cb - dc), cb + dc, tol);
    if (Number.isFinite(mc.fx) && mc.fx <= fC(cb)) cb = mc.x;
    onsetColumns(bias, i0, i1, cb, "cb", kernel, false, cCols);
  }
  const atEdge = vb <= vA + dv / 2 || vb >= vB - dv / 2 || cb <= cA + dc / 2 || cb >= cB - dc / 2;
  if (atEdge && cb - vb > res) warnings.push("joint edge fit reached its search limit");
  const h = Math.max(step / 2, res / 10);
  const fVs = (e: number) => rssAt(e, null);
  const fCs = (e: number) => rssAt(null, e);
  // Is the gap distinguishable from zero? Best fit with both onsets at one point m.
  const rssMin = rssAt(null, null);
  // (Two steps at one point are collinear with the floor: keep one, of either sign.)
  const cols4 = [ones, vTry[1], cTry[0], cTry[1]];
  const f0 = (m: number) => {
    onsetColumns(bias, i0, i1, m, "vb", kernel, false, vTry);
    onsetColumns(bias, i0, i1, m, "cb", kernel, false, cTry);
    return rssOf(cols4, yy, []);
  };
  const z = goldenMinimize(f0, vb - dv, cb + dv, tol);
  const closedDeltaChi2 = Math.max(0, (z.fx - rssMin) / (sigma * sigma * tau));
  // Gap profile: χ²(g) minimised over the midgap m, edges at m ∓ g/2.
  const gHat = cb - vb;
  const profile = (g: number) => {
    const mHat = (vb + cb) / 2;
    return brentMinimize((m) => rssAt(m - g / 2, m + g / 2), mHat - Math.max(res, step), mHat + Math.max(res, step), tol).fx;
  };
  const limit = rssMin + 3.841458820694124 * sigma * sigma * tau;
  let gapSigmaProfile: number | null = null;
  const dg = Math.max(res / 4, step / 2);
  let gLo = gHat;
  for (let k = 1; k <= 24; k++) {
    const g = gHat + k * dg;
    if (profile(g) > limit) {
      let a = gLo;
      let b = g;
      for (let it = 0; it < 6; it++) {
        const mid = (a + b) / 2;
        if (profile(mid) > limit) b = mid;
        else a = mid;
      }
      gapSigmaProfile = ((a + b) / 2 - gHat) / 1.959963984540054;
      break;
    }
    gLo = g;
  }
  if (gapSigmaProfile === null) gapSigmaProfile = (24 * dg) / 1.959963984540054;
  return { vb, cb, vbSigma: curvatureSigma(fVs, vb, h, sigma), cbSigma: curvatureSigma(fCs, cb, h, sigma), mode: "joint", closedDeltaChi2, gapSigmaProfile, warnings };
}

/** Most points an edge profile reads (edgeProfileRange). */
const PROFILE_POINTS = 160;

/**
 * Profile of one edge over a wide range: χ² of the one-onset model (floor, step, rise and curvature,
 * broadened by the kernel) on a fixed window, as the edge moves from `near` (towards the gap) to
 * `far` (into the band): 17 positions, then 11 over the coarse 95% set. Returns the range of positions whose χ², with the noise
 * variance σ²·τ of correlated noise, lies within `deltaChi2` of the best (3.84 for 95%), widened by
 * one grid step on each side. A strong onset gives a narrow range around the fitted edge; a weak one a
 * wide range, which is the honest uncertainty of its edge (the curvature at the minimum is not).
 * `twoMinima`: the 95% set is not one interval (two places fit, separated by a worse one).
 */
export function edgeProfileRange(
  inp: Pick<EdgeFitInput, "bias" | "y" | "kernel" | "lo" | "hi">,
  side: Side,
  near: number,
  far: number,
  windowFar: number,
  sigma: number,
  tau: number,
  deltaChi2 = 3.841458820694124,
): { from: number; to: number; best: number; twoMinima: boolean } | null {
  const { bias, y, kernel, lo, hi } = inp;
  const [i0, i1] = side === "cb" ? indexRange(bias, near, windowFar, lo, hi) : indexRange(bias, windowFar, near, lo, hi);
  const nw = i1 - i0 + 1;
  if (nw < 8 || !(sigma > 0)) return null;
  // A long window is read every k-th point, with χ² scaled by k (each point stands for k): the
  // profile's shape is kept at a fraction of the cost on finely sampled spectra.
  const k = Math.max(1, Math.ceil(nw / PROFILE_POINTS));
  const m = Math.floor((nw - 1) / k) + 1;
  const bs = new Float64Array(m);
  const yy = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    bs[j] = bias[i0 + j * k];
    yy[j] = y[i0 + j * k];
  }
  const ones = new Float64Array(m).fill(1);
  const buf = [new Float64Array(m), new Float64Array(m), new Float64Array(m)];
  const cols = [ones, ...buf];
  const chiAt = (e: number) => {
    onsetColumns(bs, 0, m - 1, e, side, kernel, true, buf);
    return (k * rssOf(cols, yy, [1])) / (sigma * sigma * Math.max(1, tau));
  };
  // A coarse scan over the whole range, then a fine one over the coarse 95% set.
  const scan = (a: number, b: number, G: number) => {
    const pos = Array.from({ length: G }, (_, g) => a + ((b - a) * g) / (G - 1));
    const chi = pos.map(chiAt);
    let best = 0;
    for (let g = 1; g < G; g++) if (chi[g] < chi[best]) best = g;
    let lo2 = best;
    let hi2 = best;
    for (let g = 0; g < G; g++)
      if (chi[g] - chi[best] <= deltaChi2) {
        lo2 = Math.min(lo2, g);
        hi2 = Math.max(hi2, g);
      }
    // Separate minima inside the set: the data allow two edges (an in-gap feature, or a second onset).
    let separate = false;
    for (let g = lo2 + 1; g < hi2; g++) if (chi[g] - chi[best] > deltaChi2) separate = true;
    const d = (b - a) / (G - 1);
    return { from: pos[lo2] - d, to: pos[hi2] + d, best: pos[best], bestChi: chi[best], separate };
  };
  const coarse = scan(near, far, 17);
  const fine = scan(Math.max(Math.min(near, far), Math.min(coarse.from, coarse.to)), Math.min(Math.max(near, far), Math.max(coarse.from, coarse.to)), 11);
  const from = Math.min(fine.from, fine.to);
  const to = Math.max(fine.from, fine.to);
  return { from, to, best: fine.bestChi <= coarse.bestChi ? fine.best : coarse.best, twoMinima: coarse.separate || fine.separate };
}
