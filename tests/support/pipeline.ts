/**
 * Helpers for tests of the upload pipeline against the real services started by `npm test`:
 * the presigned upload exactly as a browser or `bandcross push` does it, background workers as
 * separate processes (so one can be killed), and waiting for processing.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { createHash } from "node:crypto";
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { spectra, uploads } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { createTip } from "@/lib/services/tips/createTip";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { columnsToCsv, makeSpectrum, makeSweep, spectrumToCsv } from "@/lib/spectra";
import { createUploads } from "@/lib/services/uploads/createUploads";
import { completeUpload } from "@/lib/services/uploads/completeUpload";
import { system } from "./fixtures";

export const sha256 = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");
export const bytesOf = (text: string) => new TextEncoder().encode(text);

/** Registers, PUTs to the presigned URL and completes one file; returns the upload id. */
export async function uploadFile(ctx: Ctx, sessionId: string, name: string, bytes: Uint8Array): Promise<{ id: string; duplicate: boolean }> {
  const { uploads: [t] } = await createUploads({ ctx, input: { sessionId, files: [{ name, size: bytes.length, sha256: sha256(bytes) }] } });
  if (t.duplicate) return { id: t.id, duplicate: true };
  const res = await fetch(t.url!, { method: "PUT", headers: t.headers, body: Buffer.from(bytes) });
  if (!res.ok) throw new Error(`presigned PUT answered ${res.status}: ${await res.text()}`);
  await completeUpload({ ctx, input: { id: t.id } });
  return { id: t.id, duplicate: false };
}

export async function waitForUploads(ids: string[], { timeoutMs = 60_000, until = ["done", "failed"] } = {}) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const rows = await Promise.all(ids.map(async (id) => (await db().select().from(uploads).where(eq(uploads.id, id)))[0]));
    if (rows.every((r) => until.includes(r.status))) return rows;
    if (Date.now() > deadline) {
      const messages = [...new Set(rows.map((r) => r.message).filter(Boolean))].slice(0, 3).join(" | ");
      throw new Error(`uploads still ${rows.map((r) => r.status).join(", ")} after ${timeoutMs} ms${messages ? ` (${messages})` : ""}`);
    }
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** A worker process started by a test, with everything it has printed so far. */
export type WorkerProcess = ChildProcess & { output: () => string };

/**
 * Starts a worker process with the test environment (plus overrides); resolves once it listens.
 * The queue's upkeep runs every second unless `productionTimings` keeps the product's defaults.
 */
export function startWorkerProcess(extraEnv: Record<string, string> = {}, { productionTimings = false } = {}): Promise<WorkerProcess> {
  const env: NodeJS.ProcessEnv = { ...process.env, NODE_ENV: "test", ...(!productionTimings && { JOB_MAINTENANCE_SECONDS: "1" }), ...extraEnv };
  if (productionTimings) for (const k of Object.keys(env)) if (k.startsWith("JOB_") && !(k in extraEnv)) delete env[k];
  const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", "lib/worker/worker.ts"], {
    env,
    stdio: ["ignore", "pipe", "pipe"],
  }) as WorkerProcess;
  let log = "";
  child.output = () => log;
  child.stdout!.on("data", (d: Buffer) => (log += d.toString()));
  child.stderr!.on("data", (d: Buffer) => (log += d.toString()));
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`worker did not start:\n${log}`)), 30_000);
    const onData = () => {
      if (log.includes("listening on")) {
        clearTimeout(timer);
        child.stdout!.off("data", onData);
        resolve(child);
      }
    };
    child.stdout!.on("data", onData);
    child.on("exit", (code) => {
      clearTimeout(timer);
      if (!log.includes("listening on")) reject(new Error(`worker exited ${code}:\n${log}`));
    });
  });
}

export async function stopWorkerProcess(child: ChildProcess | undefined, signal: NodeJS.Signals = "SIGTERM"): Promise<void> {
  if (!child || child.exitCode !== null || child.signalCode !== null) return;
  await new Promise<void>((resolve) => {
    child.once("exit", () => resolve());
    child.kill(signal);
  });
}

/**
 * A sample with one tip and session holding `n` spectra of the physical model's sweep, one file
 * each, processed in this process (no worker needed). Resolves to the sample's id and its
 * spectra's ids in the order the review steps through them (by field).
 */
export async function sweepSample(
  owner: Ctx,
  o: { name: string; n: number; seed: number; sampleWorkFunctionSigma_eV?: number; tipWorkFunctionSigma_eV?: number; before?: (sampleId: string) => Promise<unknown> },
): Promise<{ sampleId: string; ids: string[] }> {
  const sampleId = (await createSample({ ctx: owner, input: { name: o.name, material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: o.sampleWorkFunctionSigma_eV ?? 0.1 } })).id;
  await o.before?.(sampleId);
  const tip = await createTip({ ctx: owner, input: { label: `W-${o.name}`, material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: o.tipWorkFunctionSigma_eV ?? 0.1 } });
  const sessionId = (await createSession({ ctx: owner, input: { sampleId, tipId: tip.id, label: "approach", date: "2026-11-22", temperature_K: 4.5 } })).id;
  for (const [i, s] of makeSweep({ n: o.n, seed: o.seed }).spectra.entries()) {
    const { id } = await uploadFile(owner, sessionId, `s-${String(i).padStart(2, "0")}.csv`, bytesOf(spectrumToCsv(s)));
    await processUpload({ ctx: system(), input: { uploadId: id } });
  }
  const ids = (await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.sampleId, sampleId)).orderBy(spectra.fieldVPerNm)).map((r) => r.id);
  return { sampleId, ids };
}

/**
 * A sample with one grid upload: 4 × 4 spectra, 0.5 nm apart, all at one setpoint (so one field),
 * whose gap grows from 80 meV in one corner in 10 meV steps. Processed in this process.
 */
export async function gridSample(owner: Ctx, name: string): Promise<{ sampleId: string; uploadId: string }> {
  const sampleId = (await createSample({ ctx: owner, input: { name, material: "stanene", workFunction_eV: 4.3, workFunctionSigma_eV: 0.1 } })).id;
  const sessionId = (await createSession({ ctx: owner, input: { sampleId, label: "grid", date: "2026-11-27", temperature_K: 4.5 } })).id;
  const cols = [];
  let bias: Float64Array | null = null;
  for (let k = 0; k < 16; k++) {
    const gap = 0.08 + 0.01 * k;
    const sp = makeSpectrum({ vbEdge_V: -gap / 2, cbEdge_V: gap / 2, T_K: 4.5, vrms_mV: 2, noise: 0.02, seed: 900 + k, step_V: 0.004 });
    bias ??= sp.bias_V;
    cols.push({ label: `px${k}`, didv: sp.didv });
  }
  const meta = { setpoint_bias_V: 0.6, setpoint_current_A: 2e-10, temperature_K: 4.5, lockin_modulation_mV_rms: 2, extra: { grid: "4 x 4", grid_step_nm: "0.5" } };
  const { id: uploadId } = await uploadFile(owner, sessionId, "grid-4x4.csv", bytesOf(columnsToCsv(bias!, cols, meta)));
  await processUpload({ ctx: system(), input: { uploadId } });
  return { sampleId, uploadId };
}
