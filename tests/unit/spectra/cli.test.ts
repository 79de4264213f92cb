import { spawn } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { zipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { columnsToCsv, makeApproachCurve, makeRepeats, makeRng, makeSpectrum, makeSweep, type SyntheticApproach, type SyntheticSpectrum } from "@/lib/spectra";

const root = new URL("../../../", import.meta.url).pathname;
let dir = "";

function toCsv(s: SyntheticSpectrum): string {
  const m = s.meta;
  const lines = [
    `# setpoint_bias_V: ${m.setpoint_bias_V}`,
    `# setpoint current (pA): ${(m.setpoint_current_A! * 1e12).toPrecision(8)}`,
    `# temperature_K: ${m.temperature_K}`,
    `# lockin_modulation_mV_rms: ${m.lockin_modulation_mV_rms}`,
    "bias (mV),dI/dV (a.u.)",
  ];
  for (let i = 0; i < s.bias_V.length; i++) lines.push(`${(s.bias_V[i] * 1000).toFixed(4)},${s.didv[i].toExponential(8)}`);
  return lines.join("\n") + "\n";
}

function approachCsv(c: SyntheticApproach): string {
  const lines = ["# setpoint bias (V): 0.1", "# setpoint current (pA): 100", "z (pm),current (pA)"];
  for (let i = 0; i < c.z_nm.length; i++) lines.push(`${(c.z_nm[i] * 1000).toFixed(3)},${(c.current_A[i] * 1e12).toPrecision(8)}`);
  return lines.join("\n") + "\n";
}

interface Run {
  code: number | null;
  stdout: string;
  stderr: string;
}

function cli(args: string[]): Promise<Run> {
  return new Promise((resolve) => {
    const p = spawn("npx", ["tsx", "lib/cli/main.ts", ...args], { cwd: root, env: { ...process.env, NO_COLOR: "1" } });
    let stdout = "";
    let stderr = "";
    p.stdout.on("data", (d) => (stdout += d));
    p.stderr.on("data", (d) => (stderr += d));
    p.on("close", (code) => resolve({ code, stdout, stderr }));
  });
}

const runs: Record<string, Run> = {};
const truthEc = 0.97;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "bandcross-cli-"));
  const f = (name: string) => join(dir, name);
  const good = makeSpectrum({ vbEdge_V: -0.12, cbEdge_V: 0.18, T_K: 4.5, vrms_mV: 2, seed: 61 });
  writeFileSync(f("good.csv"), toCsv(good));
  const lines = ["# temperature_K: 4.5", "# lockin_modulation_mV_rms: 2", "bias (V)\tdI/dV 1\tdI/dV 2"];
  const other = makeSpectrum({ vbEdge_V: -0.2, cbEdge_V: 0.1, T_K: 4.5, vrms_mV: 2, seed: 62 });
  for (let i = 0; i < good.bias_V.length; i++) lines.push(`${good.bias_V[i]}\t${good.didv[i]}\t${other.didv[i]}`);
  writeFileSync(f("line.tsv"), lines.join("\n"));
  const raggedLines = toCsv(good).split("\n");
  raggedLines[29] += ",7"; // line 30 of the file
  writeFileSync(f("ragged.csv"), raggedLines.join("\n"));
  writeFileSync(f("blob.bin"), new Uint8Array([0, 1, 2, 3, 0, 0, 0xff, 0x10, 0, 0]));
  // A single-point spike of +3 (about half the spectrum's maximum) at 0 V: a glitch the picker flags.
  const spiked = { ...good, didv: Float64Array.from(good.didv) };
  spiked.didv[good.bias_V.reduce((k, v, j) => (Math.abs(v) < Math.abs(good.bias_V[k]) ? j : k), 0)] += 3;
  writeFileSync(f("glitch.csv"), toCsv(spiked));
  writeFileSync(f("run.zip"), zipSync({ "a.csv": new TextEncoder().encode(toCsv(good)), "../escape.csv": new TextEncoder().encode(toCsv(good)) }));
  const sw = makeSweep({ seed: 31, n: 16, criticalField_V_per_nm: truthEc, slopeRatio: 0.9 });
  const sweepFiles = sw.spectra.map((s, k) => {
    const name = f(`sweep-${String(k).padStart(2, "0")}.csv`);
    writeFileSync(name, toCsv(s));
    return name;
  });
  const shrink = makeSweep({ seed: 32, n: 12, criticalField_V_per_nm: 1.3 });
  const shrinkFiles = shrink.spectra.map((s, k) => {
    const name = f(`shrink-${k}.csv`);
    writeFileSync(name, toCsv(s));
    return name;
  });
  const wf = ["--tip-work-function", "4.7", "--sample-work-function", "3.9"];
  mkdirSync(f("folder/nested"), { recursive: true });
  writeFileSync(f("folder/one.csv"), toCsv(good));
  writeFileSync(f("folder/nested/two.csv"), toCsv(other));
  writeFileSync(f("threshold.json"), JSON.stringify({ fit: { enabled: false }, threshold: { k: 4 } }));
  writeFileSync(f("broken.json"), JSON.stringify({ threshold: { k: -2 } }));
  // Repeats: two points of four repeats ("# repeats: 4"), a tip change before the second point's fourth.
  const repModel = { vbEdge_V: -0.12, cbEdge_V: 0.18, T_K: 4.5, vrms_mV: 2, noise: 0.03, seed: 71 };
  const reps = [...makeRepeats(repModel, 4), ...makeRepeats({ ...repModel, seed: 72 }, 4, { after: 3, edgeShift_V: 0.03, amplitudeFactor: 1.3 })];
  const repMeta = { setpoint_bias_V: 0.5, setpoint_current_A: 1e-10, temperature_K: 4.5, lockin_modulation_mV_rms: 2 };
  const columns = (names: string[]) => reps.slice(0, names.length).map((r, k) => ({ label: names[k], didv: r.didv }));
  const withRepeats = (n: number, csv: string) => `# repeats: ${n}\n${csv}`;
  writeFileSync(f("repeats.csv"), withRepeats(4, columnsToCsv(reps[0].bias_V, columns(reps.map((_, k) => `dI/dV ${k + 1}`)), repMeta)));
  const fb = ["dI/dV point=1 fwd", "dI/dV point=1 bwd", "dI/dV point=2 fwd", "dI/dV point=2 bwd"];
  writeFileSync(f("sweeps.csv"), columnsToCsv(reps[0].bias_V, columns(fb), repMeta));
  writeFileSync(f("uneven.csv"), withRepeats(3, columnsToCsv(reps[0].bias_V, columns(["a", "b", "c", "d"].map((c) => `dI/dV ${c}`)), repMeta)));
  writeFileSync(f("iz-good.csv"), approachCsv(makeApproachCurve({ kappa_per_nm: 10.5, seed: 71, zFrom_nm: 0.4, contact: { at_nm: -0.22, conductance_G0: 0.5 } })));
  writeFileSync(f("iz-both.csv"), approachCsv(makeApproachCurve({ kappa_per_nm: 9, seed: 72, retraction: true })));
  const flat = makeApproachCurve({ kappa_per_nm: 10, seed: 73 });
  const rng = makeRng(74);
  writeFileSync(f("iz-flat.csv"), approachCsv({ ...flat, current_A: flat.current_A.map(() => 1e-10 * (1 + 0.02 * rng.normal())) }));
  const jobs: [string, string[]][] = [
    ["average", ["analyze", f("repeats.csv"), f("sweeps.csv"), f("uneven.csv"), "--average", "--json"]],
    ["feenstra", ["analyze", f("good.csv"), "--normalise", "feenstra", "--json"]],
    ["setpoint", ["analyze", f("good.csv"), "--normalise", "setpoint", "--json"]],
    ["badNormalise", ["analyze", f("good.csv"), "--normalise", "unit"]],
    ["barrier", ["barrier", f("iz-good.csv"), f("iz-both.csv"), f("iz-flat.csv"), f("good.csv"), "--json"]],
    ["barrierTable", ["barrier", f("iz-good.csv")]],
    ["mixed", ["analyze", f("good.csv"), f("line.tsv"), f("ragged.csv"), f("blob.bin"), f("run.zip"), f("missing.csv"), "--json"]],
    ["table", ["analyze", f("good.csv"), f("line.tsv")]],
    ["sweep", ["sweep", ...sweepFiles, ...wf, "--contact-distance", "0.25", "--json"]],
    ["shrink", ["sweep", ...shrinkFiles, ...wf]],
    ["usage", ["sweep", f("good.csv"), "--json"]],
    ["unknown", ["analyze", f("good.csv"), "--frobnicate"]],
    ["folder", ["analyze", f("folder"), "--settings", f("threshold.json"), "--json"]],
    ["badSettings", ["analyze", f("good.csv"), "--settings", f("broken.json")]],
    ["flags", ["analyze", f("glitch.csv"), f("ragged.csv"), "--json"]],
  ];
  const results = await Promise.all(jobs.map(([, a]) => cli(a)));
  jobs.forEach(([k], i) => (runs[k] = results[i]));
}, 120_000);

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

const noStack = (r: Run) => expect(`${r.stdout}\n${r.stderr}`).not.toMatch(/\n\s+at .+:\d+:\d+/);

describe("bandcross analyze", () => {
  it("lists every spectrum and every rejected file, exits 1 when any file is rejected", () => {
    const r = runs.mixed;
    expect(r.code).toBe(1);
    noStack(r);
    const out = JSON.parse(r.stdout);
    const files = out.spectra.map((e: { file: string }) => e.file);
    expect(files).toEqual(["good.csv", "line.tsv", "line.tsv", "ragged.csv", "blob.bin", "run.zip/a.csv", "run.zip/../escape.csv", "missing.csv"]);
    const byFile = (name: string) => out.spectra.filter((e: { file: string }) => e.file === name);
    const good = byFile("good.csv")[0];
    expect(Object.keys(good)).toEqual(expect.arrayContaining(["file", "index", "status", "message", "warnings", "gap"]));
    expect(Object.keys(good.gap)).toEqual(expect.arrayContaining(["vbEdge_V", "cbEdge_V", "gap_eV", "midgap_V", "uncertainty_eV", "closed"]));
    expect(good.status).toBe("ok");
    expect(Math.abs(good.gap.gap_eV - 0.3)).toBeLessThan(0.005);
    expect(Math.abs(good.gap.midgap_V - 0.03)).toBeLessThan(0.005);
    expect(byFile("line.tsv").map((e: { index: number }) => e.index)).toEqual([0, 1]);
    expect(Math.abs(byFile("line.tsv")[1].gap.gap_eV - 0.3)).toBeLessThan(0.005);
    expect(byFile("ragged.csv")[0]).toMatchObject({ status: "error", gap: null });
    expect(byFile("ragged.csv")[0].message).toMatch(/^line 30: ragged row with 3 cells where 2 were expected$/);
    expect(byFile("blob.bin")[0].message).toMatch(/binary/);
    expect(byFile("run.zip/a.csv")[0].status).toBe("ok");
    expect(byFile("run.zip/../escape.csv")[0].message).toMatch(/refused/);
    expect(byFile("missing.csv")[0].message).toMatch(/no such file/);
    // Without --average or --normalise the entries are as before: no new fields.
    for (const e of out.spectra) for (const k of ["averagedFrom", "leftOut", "normalisation"]) expect(e).not.toHaveProperty(k);
  });
  it("prints a readable table without --json and exits 0 when every file was read", () => {
    const r = runs.table;
    expect(r.code).toBe(0);
    expect(r.stdout.split("\n")[0]).toMatch(/^file\s+#\s+status\s+VB edge \(mV\)\s+CB edge \(mV\)\s+gap \(meV\)/);
    expect(r.stdout).toMatch(/good\.csv\s+0\s+ok\s+-12\d\.\d\s+1[78]\d\.\d\s+30\d\.\d ± \d+\.\d/);
  });
  it("gives each pick its quality flags (a rejected file has no pick)", () => {
    const out = JSON.parse(runs.flags.stdout);
    const [glitch, ragged] = out.spectra;
    expect(glitch.gap.flags.map((f: { code: string }) => f.code)).toContain("glitch");
    expect(glitch.gap.flags.find((f: { code: string }) => f.code === "glitch").message).toMatch(/at 0 mV/);
    expect(ragged).toMatchObject({ status: "error", gap: null });
  });
  it("an unknown option is a usage error with a message, exit 2, no stack trace", () => {
    expect(runs.unknown.code).toBe(2);
    expect(runs.unknown.stderr).toMatch(/frobnicate/);
    noStack(runs.unknown);
  });
});

describe("bandcross analyze options", () => {
  it("a directory is read recursively, and --settings applies extraction settings from a JSON file", () => {
    const r = runs.folder;
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.spectra.map((e: { file: string }) => e.file).sort()).toEqual(["one.csv", "two.csv"]);
    for (const e of out.spectra) expect(e.gap.method).toBe("threshold");
  });
  it("an invalid settings file is a usage error naming the setting", () => {
    expect(runs.badSettings.code).toBe(2);
    expect(runs.badSettings.stderr).toMatch(/invalid extraction setting threshold\.k/);
    noStack(runs.badSettings);
  });
});

describe("bandcross sweep", () => {
  it("adds distance and field to every entry and finds the crossing", () => {
    const r = runs.sweep;
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.spectra).toHaveLength(16);
    for (const e of out.spectra) {
      expect(e.distance_nm).toBeGreaterThan(0.5);
      expect(e.field_V_per_nm).toBeGreaterThan(0.8);
    }
    const c = out.crossing;
    expect(Object.keys(c)).toEqual(expect.arrayContaining(["state", "found", "field_V_per_nm", "ci95_V_per_nm", "slopes"]));
    expect(c.state).toBe("crossed");
    expect(c.found).toBe(true);
    // Goal: within 0.03 V/nm of the truth and inside the 95% interval.
    expect(Math.abs(c.field_V_per_nm - truthEc)).toBeLessThan(0.03);
    expect(c.ci95_V_per_nm[0]).toBeLessThanOrEqual(truthEc);
    expect(c.ci95_V_per_nm[1]).toBeGreaterThanOrEqual(truthEc);
    expect(c.slopes.below).toBeLessThan(0);
    expect(c.slopes.above).toBeGreaterThan(0);
  });
  it("a sweep that only shrinks says closing, not crossed", () => {
    expect(runs.shrink.code).toBe(0);
    expect(runs.shrink.stdout).toMatch(/closing, not yet crossed: the gap extrapolates to zero at 1\.\d+ V\/nm/);
  });
  it("missing work functions: a usage message, exit 2, nothing on stdout", () => {
    expect(runs.usage.code).toBe(2);
    expect(runs.usage.stdout).toBe("");
    expect(runs.usage.stderr).toMatch(/--tip-work-function and --sample-work-function are required/);
    noStack(runs.usage);
  });
});

describe("bandcross analyze --average and --normalise", () => {
  type AvgEntry = { file: string; index: number; status: string; message: string | null; warnings: string[]; averagedFrom: number[]; leftOut: number[]; gap: { gap_eV: number; uncertainty_eV: number } | null };
  const entries = () => JSON.parse(runs.average.stdout).spectra as AvgEntry[];
  it("averages each point's repeats (# repeats: 4): one entry per point, the members used and left out", () => {
    const rep = entries().filter((e) => e.file === "repeats.csv");
    expect(rep.map((e) => e.index)).toEqual([0, 1]);
    expect(rep[0]).toMatchObject({ status: "ok", averagedFrom: [0, 1, 2, 3], leftOut: [] });
    // The model's gap is 0.3 eV (synthetic.ts); the averaged pick finds it within twice its uncertainty.
    expect(Math.abs(rep[0].gap!.gap_eV - 0.3)).toBeLessThanOrEqual(2 * rep[0].gap!.uncertainty_eV + 0.002);
    expect(rep[1]).toMatchObject({ status: "ok", averagedFrom: [4, 5, 6], leftOut: [7] });
    expect(rep[1].warnings.join("\n")).toMatch(/dI\/dV 8 differs from the other repeats beyond their noise/);
    expect(rep[1].warnings).toContain("average of 3 repeats");
  });
  it("reads forward and backward sweeps named point=K as repeats of point K", () => {
    const sw = entries().filter((e) => e.file === "sweeps.csv");
    expect(sw.map((e) => [e.index, e.averagedFrom])).toEqual([
      [0, [0, 1]],
      [1, [2, 3]],
    ]);
    expect(sw[0].warnings.join("\n")).toMatch(/two repeats: neither can be told to be the odd one/);
  });
  it("refuses a file whose columns are not a whole number of points, with the reason, and exits 1", () => {
    expect(runs.average.code).toBe(1);
    const bad = entries().filter((e) => e.file === "uneven.csv");
    expect(bad).toHaveLength(1);
    expect(bad[0]).toMatchObject({ status: "error", gap: null });
    expect(bad[0].message).toMatch(/"# repeats: 3" but the file has 4 dI\/dV columns/);
    noStack(runs.average);
  });
  it("--normalise feenstra picks on (dI/dV)/(I/V) and says so, with the current rebuilt from dI/dV", () => {
    expect(runs.feenstra.code).toBe(0);
    const [e] = JSON.parse(runs.feenstra.stdout).spectra;
    expect(e.normalisation).toMatchObject({ method: "feenstra", currentReconstructed: true });
    expect(e.warnings.join("\n")).toMatch(/rebuilt by integrating dI\/dV.*\n.*gap picked on the normalised conductance/s);
    expect(Math.abs(e.gap.gap_eV - 0.3)).toBeLessThanOrEqual(2 * e.gap.uncertainty_eV + 0.002);
  });
  it("--normalise setpoint divides by I_set/V_set and says so", () => {
    expect(runs.setpoint.code).toBe(0);
    const [e] = JSON.parse(runs.setpoint.stdout).spectra;
    expect(e.normalisation.method).toBe("setpoint");
    expect(e.normalisation.description).toMatch(/I_set\/V_set = 0\.2\d* nS/);
  });
  it("an unknown normalisation is a usage error naming the choices", () => {
    expect(runs.badNormalise.code).toBe(2);
    expect(runs.badNormalise.stderr).toMatch(/--normalise takes none, feenstra, setpoint; got "unit"/);
    noStack(runs.badNormalise);
  });
});

describe("bandcross barrier", () => {
  it("prints κ, σκ, φ_ap and its σ per curve in the agreed JSON; a bad curve and a spectrum are errors with messages, exit 1", () => {
    const r = runs.barrier;
    expect(r.code).toBe(1);
    noStack(r);
    const out = JSON.parse(r.stdout);
    expect(out.curves.map((c: { file: string }) => c.file)).toEqual(["iz-good.csv", "iz-both.csv", "iz-flat.csv", "good.csv"]);
    const [good, both, flat, spectrum] = out.curves;
    const fields = ["file", "index", "status", "message", "warnings", "kappa_per_nm", "kappaSigma_per_nm", "barrierHeight_eV", "barrierHeightSigma_eV", "pointsUsed"];
    for (const c of out.curves) expect(Object.keys(c)).toEqual(expect.arrayContaining(fields));
    expect(good).toMatchObject({ index: 0, status: "ok", message: null });
    // Known κ = 10.5/nm within twice the stated σ; φ_ap = ħ²κ²/(2m_e) = 3.80998 eV·Å² × (1.05 Å⁻¹)² = 4.2005 eV.
    expect(Math.abs(good.kappa_per_nm - 10.5)).toBeLessThan(2 * good.kappaSigma_per_nm);
    expect(good.barrierHeight_eV / good.kappa_per_nm ** 2).toBeCloseTo(4.2005 / 10.5 ** 2, 6);
    expect(good.barrierHeightSigma_eV / good.barrierHeight_eV).toBeCloseTo((2 * good.kappaSigma_per_nm) / good.kappa_per_nm, 9);
    expect(good.warnings.join("\n")).toMatch(/point contact left out/);
    expect(good.pointsUsed).toBeGreaterThan(50);
    expect(both.sweeps.map((s: { direction: string }) => s.direction)).toEqual(["approach", "retraction"]);
    expect(Math.abs(both.kappa_per_nm - 9)).toBeLessThan(2 * both.kappaSigma_per_nm);
    expect(flat).toMatchObject({ status: "error", kappa_per_nm: null, pointsUsed: null });
    expect(flat.message).toMatch(/does not decay/);
    expect(spectrum).toMatchObject({ status: "error", index: null, message: "no z column, and columns named like a bias or dI/dV: a spectrum, not an I(z) curve" });
  });
  it("prints a table without --json and exits 0 when every curve was fitted", () => {
    const r = runs.barrierTable;
    expect(r.code).toBe(0);
    expect(r.stdout.split("\n")[0]).toMatch(/^file\s+#\s+status\s+κ \(1\/nm\)\s+φ_ap \(eV\)\s+points/);
    expect(r.stdout).toMatch(/iz-good\.csv\s+0\s+ok\s+10\.\d\d ± 0\.\d\d\s+4\.\d\d ± 0\.\d\d/);
  });
});
