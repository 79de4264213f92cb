/**
 * The built command (scripts/build-cli.mjs) against the sources it is built from: the same output
 * byte for byte, the database path still loadable without Next's server conditions, and the
 * freshness rule the launcher (lib/cli/bin.mjs) uses to decide whether to rebuild.
 */
import { spawn } from "node:child_process";
import { mkdirSync, mkdtempSync, readFileSync, rmSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import { pathToFileURL } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeSpectrum } from "@/lib/spectra";
// @ts-expect-error plain JavaScript build script, no type declarations
import { buildCli, isFresh, root } from "../../scripts/build-cli.mjs";

interface Run {
  code: number | null;
  stdout: string;
  stderr: string;
}

function run(args: string[], env: Record<string, string> = {}): Promise<Run> {
  return new Promise((resolve) => {
    const p = spawn(process.execPath, args, { cwd: dir, env: { ...process.env, NO_COLOR: "1", ...env } });
    let stdout = "";
    let stderr = "";
    p.stdout.on("data", (d) => (stdout += d));
    p.stderr.on("data", (d) => (stderr += d));
    p.on("close", (code) => resolve({ code, stdout, stderr }));
  });
}

let dir = "";
// By path: the commands run in a temporary directory, where a bare "tsx" would not resolve.
const tsxLoader = pathToFileURL(join(root, "node_modules/tsx/dist/loader.mjs")).href;
let out = "";
const fromSources = (args: string[], env?: Record<string, string>) =>
  run(["--conditions=react-server", "--import", tsxLoader, join(root, "lib/cli/main.ts"), ...args], env);
const built = (args: string[], env?: Record<string, string>) => run([join(out, "main.js"), ...args], env);

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "bandcross-cli-build-"));
  // Inside the project, as the real build is: the bundle leaves `pg` to node_modules.
  out = mkdtempSync(join(root, "node_modules/.cache/bandcross-cli-test-"));
  await buildCli(out);
  const s = makeSpectrum({ vbEdge_V: -0.15, cbEdge_V: 0.2, T_K: 4.5, vrms_mV: 2, seed: 7 });
  const lines = ["# temperature_K: 4.5", "# lockin_modulation_mV_rms: 2", "bias (V),dI/dV (a.u.)"];
  for (let i = 0; i < s.bias_V.length; i++) lines.push(`${s.bias_V[i]},${s.didv[i]}`);
  writeFileSync(join(dir, "one.csv"), lines.join("\n") + "\n");
  writeFileSync(join(dir, "broken.json"), JSON.stringify({ threshold: { k: -2 } }));
  // A grid file of 300 short spectra, enough for the built command to pick in threads (parallel.ts).
  const grid = Array.from({ length: 300 }, (_, k) =>
    makeSpectrum({ vbEdge_V: -0.1 - 0.0002 * k, cbEdge_V: 0.12, T_K: 4.5, vrms_mV: 2, noise: 0.02, seed: 100 + k, step_V: 0.004 }),
  );
  const rows = [["bias (V)", ...grid.map((_, k) => `dI/dV point ${k}`)].join("\t")];
  for (let i = 0; i < grid[0].bias_V.length; i++) rows.push([grid[0].bias_V[i], ...grid.map((g) => g.didv[i])].join("\t"));
  writeFileSync(join(dir, "grid.tsv"), rows.join("\n") + "\n");
}, 60_000);

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
  if (out) rmSync(out, { recursive: true, force: true });
});

describe("the built bandcross command", () => {
  // Each case exercises a different part of the bundle: the picker and JSON output, the table,
  // settings refused by zod (its English messages: the bundle drops the other locales), usage errors.
  const cases: [string, string[]][] = [
    ["analyze --json", ["analyze", "one.csv", "--json"]],
    ["analyze table", ["analyze", "one.csv", "missing.csv"]],
    ["refused settings", ["analyze", "one.csv", "--settings", "broken.json"]],
    ["unknown option", ["analyze", "one.csv", "--frobnicate"]],
    ["sweep usage", ["sweep", "one.csv"]],
  ];
  it.each(cases)("answers %s exactly as the sources do", async (_, args) => {
    const [a, b] = await Promise.all([fromSources(args), built(args)]);
    expect(b).toEqual(a);
    expect(a.stdout + a.stderr).not.toBe("");
  }, 60_000);

  it("picks a grid in threads exactly as the sources pick it in one, in the file's order", async () => {
    const args = ["analyze", "grid.tsv", "--json"];
    const [single, threaded] = await Promise.all([fromSources(args), built(args, { BANDCROSS_CLI_THREADS: "2" })]);
    // No "picking in one thread" notice: the threads started and answered.
    expect(threaded.stderr).toBe("");
    expect(threaded).toEqual(single);
    const entries = (JSON.parse(threaded.stdout) as { spectra: { index: number; status: string }[] }).spectra;
    expect(entries.map((e) => e.index)).toEqual(Array.from({ length: 300 }, (_, k) => k));
    expect(entries.filter((e) => e.status === "ok").length).toBeGreaterThan(290);
  }, 60_000);

  it("loads the token command's database code (server-only resolved at build time)", async () => {
    // A complete environment with an address where no PostgreSQL listens: the command gets as far
    // as its first query, which it can only send once the services and the database client loaded.
    const env = {
      DATABASE_URL: "postgres://bandcross:x@127.0.0.1:9/bandcross",
      AUTH_SECRET: "a".repeat(32),
      TOKEN_SECRET: "b".repeat(32),
      S3_BUCKET: "bucket",
      S3_ACCESS_KEY_ID: "k",
      S3_SECRET_ACCESS_KEY: "s",
      RESEND_API_KEY: "r",
    };
    const r = await built(["token", "create", "--lab", "demo"], env);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^bandcross token: could not create the token: Failed query: select .* from "labs"/);
  }, 30_000);

  it("records the files it was built from", () => {
    const recorded = JSON.parse(readFileSync(join(out, "inputs.json"), "utf8")) as string[];
    expect(recorded).toEqual(expect.arrayContaining(["lib/cli/main.ts", "lib/spectra/settings.ts", "package-lock.json"]));
    expect(recorded.filter((f) => f.startsWith("node_modules/"))).toEqual([]);
  });

  it("is fresh until one of the files it was built from changes or goes away", () => {
    const fake = join(dir, "fake-build");
    expect(isFresh(fake)).toBe(false); // no build at all
    // A build of one source file, recorded as buildCli records its inputs (relative to the root).
    const source = join(dir, "source.ts");
    writeFileSync(source, "export {};\n");
    mkdirSync(fake);
    writeFileSync(join(fake, "main.js"), "");
    writeFileSync(join(fake, "inputs.json"), JSON.stringify([relative(root, source)]));
    const t = Date.now() / 1000;
    utimesSync(source, t - 60, t - 60);
    utimesSync(join(fake, "main.js"), t - 30, t - 30);
    expect(isFresh(fake)).toBe(true);
    utimesSync(source, t, t); // edited after the build
    expect(isFresh(fake)).toBe(false);
    utimesSync(source, t - 60, t - 60);
    expect(isFresh(fake)).toBe(true);
    rmSync(source); // renamed or deleted
    expect(isFresh(fake)).toBe(false);
  });
});
