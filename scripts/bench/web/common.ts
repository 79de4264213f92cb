/**
 * Shared by the web parts of the benchmark (push, grid, phase, browser). They run inside the stack
 * that `scripts/stack.ts bench` brings up in .bench-data/, with its environment (DATABASE_URL,
 * APP_URL, S3_*): a lab of their own with an owner, an API token, and the HTTP API on loopback.
 */
import { spawn } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import bcrypt from "bcryptjs";
import { db } from "@/db/client";
import { labs, memberships, users } from "@/db/schema";
import { createTokenForLab } from "@/lib/services/tokens/createTokenForLab";
import { makeSweep, type SyntheticSweepPoint } from "@/lib/spectra";

export const line = (s = "") => process.stdout.write(s + "\n");

/** Prints one measured figure against its goal: `ok` or `MISSED`, never silent. */
export function verdict(label: string, value: number, goal: number, unit: string, digits = 1, better: "lower" | "higher" = "lower"): boolean {
  const ok = better === "lower" ? value <= goal : value >= goal;
  line(`  ${label.padEnd(46)} ${value.toFixed(digits).padStart(8)} ${unit.padEnd(3)}  goal ${better === "lower" ? "≤" : "≥"} ${goal} ${unit}  ${ok ? "ok" : "MISSED"}`);
  if (!ok) missed.push(`${label}: ${value.toFixed(digits)} ${unit} (goal ${better === "lower" ? "≤" : "≥"} ${goal} ${unit})`);
  return ok;
}
export const missed: string[] = [];

export function quantileOf(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  if (!s.length) return NaN;
  const i = (s.length - 1) * q;
  const lo = Math.floor(i);
  const hi = Math.ceil(i);
  return s[lo] + (s[hi] - s[lo]) * (i - lo);
}

export function requireStack(): { appUrl: string; apiBase: string; dataDir: string } {
  if (process.env.BANDCROSS_BENCH_STACK !== "1" || !process.env.DATABASE_URL || !process.env.APP_URL) {
    throw new Error("the web parts run inside the bench stack: use `npm run bench -- web` (scripts/stack.ts bench)");
  }
  const appUrl = process.env.APP_URL.replace(/\/+$/, "");
  // The app binds 127.0.0.1; API calls go straight there (loopback only), the browser uses APP_URL.
  const apiBase = `http://127.0.0.1:${new URL(appUrl).port}`;
  return { appUrl, apiBase, dataDir: process.env.BANDCROSS_BENCH_DATA ?? ".bench-data" };
}

export const BENCH_PASSWORD = "bench password 5000";

export interface BenchLab {
  slug: string;
  email: string;
  token: string;
  tipId: string;
}

let labOnce: Promise<BenchLab> | null = null;

/** One lab for all web parts: an owner who can sign in, an API token, and a tungsten tip. */
export function benchLab(): Promise<BenchLab> {
  labOnce ??= (async () => {
    const tag = randomUUID().slice(0, 8);
    const d = db();
    const [lab] = await d.insert(labs).values({ slug: `bench-${tag}`, name: `Bench lab ${tag}` }).returning();
    const [u] = await d.insert(users).values({ email: `owner-${tag}@bench.example`, name: `Bench owner ${tag}`, passwordHash: await bcrypt.hash(BENCH_PASSWORD, 8) }).returning();
    await d.insert(memberships).values({ labId: lab.id, userId: u.id, role: "owner" });
    const made = await createTokenForLab({ ctx: { db: d, task: "bench" }, input: { labSlug: lab.slug, name: "bench" } });
    const partial = { slug: lab.slug, email: u.email, token: made.token, tipId: "" };
    const tip = await api<{ id: string }>(partial, "POST", "/tips", { label: `W-${tag}`, material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: 0.1 });
    return { ...partial, tipId: tip.id };
  })();
  return labOnce;
}

export async function api<T>(lab: Pick<BenchLab, "token">, method: string, p: string, body?: unknown): Promise<T> {
  const { apiBase } = requireStack();
  const res = await fetch(`${apiBase}/api/v1${p}`, {
    method,
    headers: { authorization: `Bearer ${lab.token}`, ...(body ? { "content-type": "application/json" } : {}) },
    body: body ? JSON.stringify(body) : undefined,
  });
  const text = await res.text();
  if (!res.ok) throw new Error(`${method} ${p}: HTTP ${res.status} ${text.slice(0, 300)}`);
  return (text ? JSON.parse(text) : {}) as T;
}

/** A sample (germanene-like work function 3.9 eV, as the synthetic sweeps assume) with one session on the bench tip. */
export async function sampleWithSession(lab: BenchLab, name: string): Promise<{ sampleId: string; sessionId: string }> {
  const sample = await api<{ id: string }>(lab, "POST", "/samples", { name, material: "germanene (bilayer)", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 });
  const session = await api<{ id: string }>(lab, "POST", "/sessions", { sampleId: sample.id, tipId: lab.tipId, date: "2026-11-30", temperature_K: 4.5, label: name });
  return { sampleId: sample.id, sessionId: session.id };
}

export interface PushResult {
  wall_s: number;
  code: number;
  summary: { files: { file: string; status: string; spectra: number; message: string | null }[]; ok: number; failed: number } | null;
  stderr: string;
}

/** `bandcross push DIR --session ID --url URL --json` as the acquisition PC runs it, timed from spawn to exit. */
export function pushDir(lab: BenchLab, dir: string, sessionId: string): Promise<PushResult> {
  const { apiBase } = requireStack();
  const t = performance.now();
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", "lib/cli/main.ts", "push", dir, "--session", sessionId, "--url", apiBase, "--json", "--timeout", "240"], {
      env: { ...process.env, BANDCROSS_TOKEN: lab.token },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let out = "";
    let err = "";
    child.stdout.on("data", (b: Buffer) => (out += b.toString()));
    child.stderr.on("data", (b: Buffer) => (err += b.toString()));
    child.on("error", reject);
    child.on("close", (code) => {
      let summary: PushResult["summary"] = null;
      try {
        summary = JSON.parse(out);
      } catch {
        // printed below by the caller
      }
      resolve({ wall_s: (performance.now() - t) / 1000, code: code ?? 1, summary, stderr: err });
    });
  });
}

export function reportPushFailures(r: PushResult) {
  if (r.code === 0 && r.summary) return;
  line(`  push exited ${r.code}; ${r.summary ? `${r.summary.failed} failed: ${r.summary.files.filter((f) => f.status !== "done").slice(0, 3).map((f) => `${f.file}: ${f.status} ${f.message ?? ""}`).join("; ")}` : r.stderr.slice(-600)}`);
}

/** 512 points from −0.5 to 0.5 V. */
export const STEP_512 = 1 / 511;

export function tempDir(name: string): string {
  const dir = path.join(requireStack().dataDir, "work", name);
  fs.rmSync(dir, { recursive: true, force: true });
  fs.mkdirSync(dir, { recursive: true });
  return dir;
}

/** The worker's log lines for one upload ("process-upload ID: done (N spectra, T ms …)"). */
export function workerLogFor(uploadId: string): string[] {
  try {
    return fs
      .readFileSync(path.join(requireStack().dataDir, "logs", "worker.log"), "utf8")
      .split("\n")
      .filter((l) => l.includes(uploadId));
  } catch {
    return [];
  }
}

/** A field sweep as the JSON the importer reads: every spectrum with its own setpoint (so its own field) and region. */
export function sweepJson(points: SyntheticSweepPoint[], region: (k: number) => string): string {
  const bias_mV = Array.from(points[0].bias_V, (v) => Number((v * 1000).toFixed(3)));
  return JSON.stringify({
    format: "bandcross-spectra",
    version: 1,
    meta: { temperature_K: 4.5, lockin_modulation_mV_rms: 3 },
    spectra: points.map((s, k) => ({
      label: `point ${k}`,
      bias_mV,
      didv: Array.from(s.didv, (v) => Number(v.toPrecision(6))),
      meta: { setpoint_bias_V: s.meta.setpoint_bias_V, setpoint_current_A: Number(s.meta.setpoint_current_A!.toPrecision(6)), z_offset_pm: 0, region: region(k) },
    })),
  });
}

let phaseOnce: Promise<{ sampleId: string; spectra: number; build_s: number }> | null = null;

/**
 * The 5,000-spectrum sample for the phase endpoint and the browser parts: 10 JSON files of 500
 * spectra each (every spectrum at its own setpoint, two regions), pushed with `bandcross push`.
 */
export function phaseSample(): Promise<{ sampleId: string; spectra: number; build_s: number }> {
  phaseOnce ??= (async () => {
    const t = performance.now();
    const lab = await benchLab();
    const { sampleId, sessionId } = await sampleWithSession(lab, "GX-5000 phase bench");
    const dir = tempDir("phase-5000");
    for (let f = 0; f < 10; f++) {
      const sweep = makeSweep({ n: 500, seed: 9100 + f, step_V: STEP_512, currentMin_A: 2e-11 * (1 + f / 40), noise: 0.02 });
      fs.writeFileSync(path.join(dir, `line-${String(f).padStart(2, "0")}.json`), sweepJson(sweep.spectra, (k) => (k % 3 === 0 ? "terrace B" : "terrace A")));
    }
    const r = await pushDir(lab, dir, sessionId);
    reportPushFailures(r);
    if (r.code !== 0 || !r.summary) throw new Error("could not build the 5,000-spectrum sample");
    const spectra = r.summary.files.reduce((a, f) => a + f.spectra, 0);
    return { sampleId, spectra, build_s: (performance.now() - t) / 1000 };
  })();
  return phaseOnce;
}
