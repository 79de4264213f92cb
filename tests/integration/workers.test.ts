import { eq, inArray } from "drizzle-orm";
import pLimit from "p-limit";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { spectra } from "@/db/schema";
import { boss, QUEUES, stopBoss } from "@/lib/jobs/queue";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { completeUpload } from "@/lib/services/uploads/completeUpload";
import { createUploads } from "@/lib/services/uploads/createUploads";
import { makeSweep, spectrumToCsv } from "@/lib/spectra";
import { makeLab, type LabFixture } from "../support/fixtures";
import { bytesOf, sha256, startWorkerProcess, stopWorkerProcess, uploadFile, waitForUploads, type WorkerProcess } from "../support/pipeline";

/**
 * Several worker processes against one PostgreSQL and one bucket, with the product's own queue
 * timings (no test overrides of the job lease or the queue's upkeep): a killed worker's job is
 * taken up by its successor within a minute, and two workers on one queue process each of 200
 * files exactly once. Files and spectra come from the documented physical model
 * (lib/spectra/synthetic.ts), coarse (51 points) to keep the run short.
 */
let lab: LabFixture;
let sessionId: string;
const workers: WorkerProcess[] = [];

beforeAll(async () => {
  lab = await makeLab("Workers");
  const owner = lab.ctx("owner");
  const sampleId = (await createSample({ ctx: owner, input: { name: "Many files", material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } })).id;
  sessionId = (await createSession({ ctx: owner, input: { sampleId, label: "push", date: "2026-12-02", temperature_K: 4.5 } })).id;
  // Jobs other test files left in the queue are worked off first, so the job the test kills is its own.
  const drain = await startWorkerProcess();
  const b = await boss();
  const deadline = Date.now() + 30_000;
  while ((await b.getQueueSize(QUEUES.processUpload, { before: "completed" })) > 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 200));
  await stopWorkerProcess(drain);
}, 60_000);

afterAll(async () => {
  for (const w of workers) await stopWorkerProcess(w);
  await stopBoss();
  await closeDb();
});

describe("worker processes", () => {
  it("a worker killed with SIGKILL mid-job: a newly started worker completes the job within 60 s", async () => {
    const hanging = await startWorkerProcess({ WORKER_FAULT: "hang-after-parse" }, { productionTimings: true });
    workers.push(hanging);
    const bytes = bytesOf(spectrumToCsv(makeSweep({ n: 2, seed: 511, step_V: 0.02 }).spectra[0]));
    const { id } = await uploadFile(lab.ctx("microscopist"), sessionId, "killed.csv", bytes);
    await waitForUploads([id], { until: ["processing"], timeoutMs: 20_000 });
    await stopWorkerProcess(hanging, "SIGKILL");
    const killedAt = Date.now();
    const next = await startWorkerProcess({}, { productionTimings: true });
    workers.push(next);
    // The goal of the product: a restarted worker resumes its predecessor's jobs within 60 s.
    const [row] = await waitForUploads([id], { timeoutMs: 60_000 });
    expect(row.status).toBe("done");
    expect(Date.now() - killedAt).toBeLessThan(60_000);
    expect(await db().select().from(spectra).where(eq(spectra.uploadId, id))).toHaveLength(1);
    await stopWorkerProcess(next);
  }, 120_000);

  it("two workers on one queue process each of 200 pushed files exactly once", async () => {
    for (const w of workers.splice(0)) await stopWorkerProcess(w);
    const a = await startWorkerProcess({}, { productionTimings: true });
    const b = await startWorkerProcess({}, { productionTimings: true });
    workers.push(a, b);
    const files = makeSweep({ n: 200, seed: 612, step_V: 0.02 }).spectra.map((s, i) => {
      const bytes = bytesOf(spectrumToCsv(s));
      return { name: `push-${String(i).padStart(3, "0")}.csv`, bytes, sha256: sha256(bytes) };
    });
    const ctx = lab.ctx("microscopist");
    const { uploads: tickets } = await createUploads({ ctx, input: { sessionId, files: files.map((f) => ({ name: f.name, size: f.bytes.length, sha256: f.sha256 })) } });
    expect(tickets.filter((t) => !t.duplicate)).toHaveLength(200);
    const limit = pLimit(8);
    await Promise.all(
      tickets.map((t, i) =>
        limit(async () => {
          const res = await fetch(t.url!, { method: "PUT", headers: t.headers, body: Buffer.from(files[i].bytes) });
          expect(res.ok).toBe(true);
          await completeUpload({ ctx, input: { id: t.id } });
        }),
      ),
    );
    const ids = tickets.map((t) => t.id);
    const rows = await waitForUploads(ids, { timeoutMs: 60_000 });
    expect(rows.map((r) => r.status)).toEqual(Array(200).fill("done"));
    // Exactly once: each file was claimed once (attempts), stored once (one spectrum per file)...
    expect(rows.every((r) => r.attempts === 1 && r.spectraCount === 1)).toBe(true);
    const stored = await db().select({ uploadId: spectra.uploadId }).from(spectra).where(inArray(spectra.uploadId, ids));
    expect(stored).toHaveLength(200);
    expect(new Set(stored.map((s) => s.uploadId)).size).toBe(200);
    // ...and run by one worker only, each worker taking part.
    const doneBy = (w: WorkerProcess) => new Set([...w.output().matchAll(/process-upload ([0-9a-f-]{36}): done/g)].map((m) => m[1]));
    // A worker logs a file after its refit, a moment after the row says done.
    const logged = Date.now() + 10_000;
    while (doneBy(a).size + doneBy(b).size < 200 && Date.now() < logged) await new Promise((r) => setTimeout(r, 100));
    const [byA, byB] = [doneBy(a), doneBy(b)];
    expect(byA.size + byB.size).toBe(200);
    expect([...byA].filter((id) => byB.has(id))).toEqual([]);
    expect(byA.size).toBeGreaterThan(0);
    expect(byB.size).toBeGreaterThan(0);
  }, 120_000);
});
