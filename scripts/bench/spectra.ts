/**
 * Benchmark of the analysis core (part "spectra" of `npm run bench`).
 *
 * 1. Throughput: a 64×64 grid of 512-point spectra from the physical model (lib/spectra/synthetic.ts),
 *    written as one tab-separated file (≈ 27 MB); import and gap picking in spectra per second and the
 *    peak memory of a process that does just that (grid-child.ts), against the numpy/scipy script
 *    (spectra_numpy.py: Savitzky–Golay + threshold) on the same file, with the ratios.
 * 2. Whole process: `bandcross analyze GRID --json` against `python3 spectra_numpy.py GRID`, wall time.
 * 3. Accuracy on held-out synthetic spectra (seeds unlike the tests'): gaps 20–600 meV, 1.2–77 K,
 *    1–8 mV rms, varied noise, steps, backgrounds; median and 90th percentile |gap error|. And
 *    held-out sweeps: |critical-field error| and how often the 95% interval covers the truth.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, statSync, writeFileSync } from "node:fs";
import { availableParallelism, tmpdir } from "node:os";
import { join } from "node:path";
import { estimateField, fitCrossing, makeRng, makeSpectrum, makeSweep, pickGap, quantile, type SyntheticSpectrum } from "../../lib/spectra";

const root = new URL("../../", import.meta.url).pathname;
const line = (s = "") => process.stdout.write(s + "\n");

function writeGrid(path: string): { seconds: number; bytes: number } {
  const t = performance.now();
  const n = 512;
  const side = 64;
  const columns: SyntheticSpectrum[] = [];
  for (let yy = 0; yy < side; yy++)
    for (let xx = 0; xx < side; xx++) {
      // A smooth "map": the gap varies across the grid like a sample with domains.
      const gap = 0.25 + 0.15 * Math.sin(xx / 9) * Math.cos(yy / 11);
      const mid = 0.03 * Math.cos(xx / 13);
      columns.push(
        makeSpectrum({ vbEdge_V: mid - gap / 2, cbEdge_V: mid + gap / 2, T_K: 4.5, vrms_mV: 2, noise: 0.02, seed: 7_000_000 + yy * side + xx, biasMin_V: -0.6, biasMax_V: 0.6, step_V: 1.2 / (n - 1) }),
      );
    }
  const rows: string[] = ["# temperature_K: 4.5", "# lockin_modulation_mV_rms: 2", ["bias (mV)", ...columns.map((_, k) => `dI/dV x${k % side} y${Math.floor(k / side)}`)].join("\t")];
  const bias = columns[0].bias_V;
  for (let i = 0; i < n; i++) {
    const cells = new Array<string>(columns.length + 1);
    cells[0] = (bias[i] * 1000).toFixed(4);
    for (let k = 0; k < columns.length; k++) cells[k + 1] = columns[k].didv[i].toExponential(7);
    rows.push(cells.join("\t"));
  }
  writeFileSync(path, rows.join("\n") + "\n");
  return { seconds: (performance.now() - t) / 1000, bytes: statSync(path).size };
}

function timed(cmd: string, args: string[], env: Record<string, string> = {}): { wall_s: number; stdout: string; stderr: string; status: number | null } {
  const t = performance.now();
  const r = spawnSync(cmd, args, { cwd: root, encoding: "utf8", maxBuffer: 512 * 1024 * 1024, env: { ...process.env, ...env } });
  return { wall_s: (performance.now() - t) / 1000, stdout: r.stdout, stderr: r.stderr, status: r.status };
}

function throughput(grid: string) {
  const child = timed("npx", ["tsx", "scripts/bench/grid-child.ts", grid]);
  if (child.status !== 0) throw new Error(`grid child failed: ${child.stderr}`);
  const ours = JSON.parse(child.stdout);
  const py = timed("python3", ["scripts/bench/spectra_numpy.py", grid]);
  if (py.status !== 0) throw new Error(`numpy script failed: ${py.stderr}`);
  const theirs = JSON.parse(py.stdout);
  // The built command (node_modules/.bin/bandcross: plain JavaScript, picking on every core), the
  // same in one thread, and the documented npm entry point with npm's own start-up on top.
  const bin = join(root, "node_modules", ".bin", "bandcross");
  const cli = timed(bin, ["analyze", grid, "--json"]);
  if (cli.status !== 0) throw new Error(`bandcross analyze failed (exit ${cli.status}): ${cli.stderr.slice(0, 300)}`);
  const cliOut = JSON.parse(cli.stdout);
  const oneThread = timed(bin, ["analyze", grid, "--json"], { BANDCROSS_CLI_THREADS: "1" });
  const npmRun = timed("npm", ["run", "--silent", "bandcross", "--", "analyze", grid, "--json"]);
  const fast = timed(bin, ["analyze", grid, "--json", "--no-fit"]);
  line(`grid: ${ours.n} spectra × 512 points, ${ours.ok} picked; median gap ${(ours.median_gap_eV * 1000).toFixed(1)} meV (numpy: ${(theirs.median_gap_eV * 1000).toFixed(1)} meV)`);
  line("");
  line("in process                     bandcross        numpy/scipy " + theirs.scipy + "   ratio");
  const row = (label: string, a: number, b: number, unit: string) =>
    line(`${label.padEnd(30)} ${a.toFixed(0).padStart(9)} ${unit.padEnd(6)} ${b.toFixed(0).padStart(9)} ${unit.padEnd(6)} ${(a / b).toFixed(2).padStart(6)}×`);
  row("import (spectra/s)", ours.n / ours.read_s, theirs.n / theirs.read_s, "/s");
  row("gap picking (spectra/s)", ours.n / ours.pick_s, theirs.n / theirs.pick_s, "/s");
  line(`${"peak memory (MB)".padEnd(30)} ${ours.max_rss_MB.toFixed(0).padStart(9)} ${"MB".padEnd(6)} ${theirs.max_rss_MB.toFixed(0).padStart(9)} ${"MB".padEnd(6)}`);
  line("  (bandcross picking = threshold + broadening-aware fit of both edges; numpy = Savitzky–Golay + threshold)");
  line("");
  line(`whole process, read + pick the grid file:`);
  line(`  node_modules/.bin/bandcross analyze --json          ${cli.wall_s.toFixed(2)} s  (${cliOut.spectra.length} entries, ${availableParallelism()} threads)  ratio ${(cli.wall_s / py.wall_s).toFixed(2)}`);
  line(`  … in one thread (BANDCROSS_CLI_THREADS=1)           ${oneThread.wall_s.toFixed(2)} s  ratio ${(oneThread.wall_s / py.wall_s).toFixed(2)}`);
  line(`  npm run --silent bandcross -- analyze --json         ${npmRun.wall_s.toFixed(2)} s  ratio ${(npmRun.wall_s / py.wall_s).toFixed(2)}`);
  line(`  … --no-fit (threshold edges only, like the script)   ${fast.wall_s.toFixed(2)} s  ratio ${(fast.wall_s / py.wall_s).toFixed(2)}`);
  line(`  python3 numpy/scipy                                  ${py.wall_s.toFixed(2)} s  (goal: bandcross ≤ 0.3 × this)`);
}

/**
 * The numpy/scipy script's accuracy on held-out spectra that share one bias axis (−0.8 … 0.8 V, 2 mV)
 * so they fit in one grid file; the same spectra through pickGap for comparison.
 */
function baseline(dir: string) {
  const rng = makeRng(9_733_101);
  const N = 300;
  const cols: SyntheticSpectrum[] = [];
  for (let k = 0; k < N; k++) {
    const gap = 0.02 + 0.58 * rng.uniform();
    const mid = -0.1 + 0.2 * rng.uniform();
    const amplitude = 3 + 17 * rng.uniform();
    cols.push(
      makeSpectrum({
        vbEdge_V: mid - gap / 2,
        cbEdge_V: mid + gap / 2,
        T_K: Math.exp(Math.log(1.2) + (Math.log(77) - Math.log(1.2)) * rng.uniform()),
        vrms_mV: 1 + 7 * rng.uniform(),
        amplitude,
        noise: amplitude * (0.0005 + 0.005 * rng.uniform()),
        seed: 9_800_000 + k,
        biasMin_V: -0.8,
        biasMax_V: 0.8,
        step_V: 0.002,
      }),
    );
  }
  const rows = [["bias (mV)", ...cols.map((_, k) => `dI/dV ${k}`)].join("\t")];
  for (let i = 0; i < cols[0].bias_V.length; i++) rows.push([(cols[0].bias_V[i] * 1000).toFixed(4), ...cols.map((c) => c.didv[i].toExponential(7))].join("\t"));
  const file = join(dir, "heldout.tsv");
  const truthFile = join(dir, "heldout-truth.json");
  writeFileSync(file, rows.join("\n") + "\n");
  writeFileSync(truthFile, JSON.stringify(cols.map((c) => c.truth.gap_eV)));
  const py = timed("python3", ["scripts/bench/spectra_numpy.py", file, "--truth", truthFile]);
  if (py.status !== 0) throw new Error(`numpy script failed: ${py.stderr}`);
  const r = JSON.parse(py.stdout);
  const ours = cols.map((c) => {
    const p = pickGap(c);
    return p.gap_eV === null ? Infinity : Math.abs(p.gap_eV - c.truth.gap_eV) * 1000;
  });
  line(`  same kind of spectra on one axis (${N}): numpy/scipy script median ${r.median_abs_err_meV.toFixed(1)} meV, 90th percentile ${r.p90_abs_err_meV.toFixed(1)} meV;`);
  line(`    bandcross on the same spectra: median ${quantile(ours, 0.5).toFixed(2)} meV, 90th percentile ${quantile(ours, 0.9).toFixed(2)} meV`);
}

/**
 * The held-out spectra of our own model (seeds unlike the tests'): gaps 20–600 meV, 1.2–77 K, 1–8 mV
 * rms, varied noise, steps and backgrounds. Also read by the accuracy part as "the old suite".
 */
export function heldOutSpectra(): SyntheticSpectrum[] {
  const rng = makeRng(9_417_003);
  const N = 400;
  const out: SyntheticSpectrum[] = [];
  for (let k = 0; k < N; k++) {
    const gap = 0.02 + 0.58 * rng.uniform();
    const mid = -0.15 + 0.3 * rng.uniform();
    const T = Math.exp(Math.log(1.2) + (Math.log(77) - Math.log(1.2)) * rng.uniform());
    const vrms = 1 + 7 * rng.uniform();
    const amplitude = 3 + 17 * rng.uniform();
    const noise = amplitude * (0.0005 + 0.005 * rng.uniform());
    const step = [0.0005, 0.001, 0.002, 0.004][Math.floor(4 * rng.uniform())];
    out.push(
      makeSpectrum({
        vbEdge_V: mid - gap / 2,
        cbEdge_V: mid + gap / 2,
        T_K: T,
        vrms_mV: vrms,
        noise,
        amplitude,
        offset: 0.02 * amplitude * rng.uniform(),
        background: { linear: -0.5 + rng.uniform(), quadratic: 2 * rng.uniform() },
        seed: 9_000_000 + k,
        step_V: step,
      }),
    );
  }
  return out;
}

function accuracy(dir: string) {
  const spectra = heldOutSpectra();
  const N = spectra.length;
  const err: number[] = [];
  const thrErr: number[] = [];
  let noGap = 0;
  let covered = 0;
  const t = performance.now();
  for (const s of spectra) {
    const gap = s.truth.gap_eV;
    const p = pickGap(s);
    if (p.status !== "ok") {
      noGap++;
      err.push(Infinity);
      continue;
    }
    err.push(Math.abs(p.gap_eV! - gap) * 1000);
    thrErr.push(Math.abs(p.threshold_edges!.cbEdge_V - p.threshold_edges!.vbEdge_V - gap) * 1000);
    if (Math.abs(p.gap_eV! - gap) <= 1.96 * p.uncertainty_eV!) covered++;
  }
  line(`held-out spectra: ${N} (gaps 20–600 meV, 1.2–77 K, 1–8 mV rms, steps 0.5–4 mV), ${noGap} without a gap, ${((performance.now() - t) / N).toFixed(2)} ms each`);
  line(`  |gap error|  median ${quantile(err, 0.5).toFixed(2)} meV   90th percentile ${quantile(err, 0.9).toFixed(2)} meV   max ${Math.max(...err).toFixed(1)} meV   (goals ≤ 10 and ≤ 30; aim ≤ 3)`);
  line(`  threshold edges alone: median ${quantile(thrErr, 0.5).toFixed(2)} meV   90th percentile ${quantile(thrErr, 0.9).toFixed(2)} meV`);
  line(`  gap ± 1.96σ covers the truth in ${((100 * covered) / (N - noGap)).toFixed(1)}% of spectra`);
  baseline(dir);

  const M = 24;
  const ecErr: number[] = [];
  let ciCover = 0;
  let crossed = 0;
  const srng = makeRng(9_511_017);
  for (let k = 0; k < M; k++) {
    const ec = 0.92 + 0.15 * srng.uniform();
    const sw = makeSweep({
      criticalField_V_per_nm: ec,
      slope_eV_per_V_per_nm: 0.5 + srng.uniform(),
      slopeRatio: 0.6 + 0.8 * srng.uniform(),
      midgapShift_V_per_V_per_nm: -0.05 + 0.1 * srng.uniform(),
      T_K: [1.2, 4.5, 10][Math.floor(3 * srng.uniform())],
      vrms_mV: 1 + 4 * srng.uniform(),
      noise: 0.01 + 0.03 * srng.uniform(),
      n: 14 + Math.floor(11 * srng.uniform()),
      seed: 9_600 + k,
    });
    const pts = sw.spectra.map((s) => {
      const p = pickGap(s);
      return { field_V_per_nm: estimateField(sw.fieldModel, s.meta).field_V_per_nm, fieldSigma_V_per_nm: 0, gap_eV: p.gap_eV ?? NaN, gapSigma_eV: p.uncertainty_eV ?? NaN };
    });
    const c = fitCrossing(pts);
    if (c.state !== "crossed") {
      ecErr.push(Infinity);
      continue;
    }
    crossed++;
    ecErr.push(Math.abs(c.field_V_per_nm! - ec));
    if (c.ci95_V_per_nm![0] <= ec && ec <= c.ci95_V_per_nm![1]) ciCover++;
  }
  line(`held-out sweeps: ${M} (E_c 0.92–1.07 V/nm, slopes 0.5–1.5 eV per V/nm, asymmetric, midgap drift), ${crossed} found crossed`);
  line(`  |E_c error|  median ${quantile(ecErr, 0.5).toFixed(4)} V/nm   max ${Math.max(...ecErr).toFixed(4)} V/nm   (goal ≤ 0.03)`);
  line(`  95% interval covers the true E_c in ${ciCover}/${crossed} sweeps`);
}

export async function run(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), "bandcross-bench-"));
  try {
    const grid = join(dir, "grid-64x64.tsv");
    const g = writeGrid(grid);
    line(`wrote ${(g.bytes / 1e6).toFixed(1)} MB grid file in ${g.seconds.toFixed(1)} s`);
    throughput(grid);
    line("");
    accuracy(dir);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
