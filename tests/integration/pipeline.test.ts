import type { ChildProcess } from "node:child_process";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { analysisRuns, gapPicks, spectra, uploads } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { saveExtractionSettings } from "@/lib/services/analysis/saveExtractionSettings";
import { saveFieldModel } from "@/lib/services/analysis/saveFieldModel";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { getPhase } from "@/lib/services/spectra/getPhase";
import { getSpectrum } from "@/lib/services/spectra/getSpectrum";
import { listSessionSpectra } from "@/lib/services/spectra/listSessionSpectra";
import { tagSpectra } from "@/lib/services/spectra/tagSpectra";
import { createTip } from "@/lib/services/tips/createTip";
import { createUploads } from "@/lib/services/uploads/createUploads";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { completeUpload } from "@/lib/services/uploads/completeUpload";
import { getUpload } from "@/lib/services/uploads/getUpload";
import { retryUpload } from "@/lib/services/uploads/retryUpload";
import { estimateField, makeSweep, resolveFieldModel, spectrumToCsv } from "@/lib/spectra";
import { objectSize } from "@/lib/storage/s3";
import { makeLab, rejection, type LabFixture, system } from "../support/fixtures";
import { bytesOf, sha256, startWorkerProcess, stopWorkerProcess, uploadFile, waitForUploads } from "../support/pipeline";

/**
 * The main path end to end against the real PostgreSQL, the storage fake and worker processes:
 * files go to storage by presigned PUT, a worker parses them, picks gaps, estimates fields and
 * refits the sample. The sweep comes from the project's documented physical model
 * (lib/spectra/synthetic.ts): tip 4.7 eV, sample 3.9 eV, d_c = 0.25 nm, gap closing at 0.98 V/nm.
 */
process.env.JOB_EXPIRE_SECONDS = "4";

let lab: LabFixture;
let other: LabFixture;
let sessionId: string;
let sampleId: string;
let worker: ChildProcess | undefined;
const sweep = makeSweep({ n: 20, seed: 31 });
const files = sweep.spectra.map((s, i) => ({ name: `approach-${String(i).padStart(2, "0")}.csv`, bytes: bytesOf(spectrumToCsv(s)) }));
const ids: string[] = [];

beforeAll(async () => {
  lab = await makeLab("Pipeline");
  other = await makeLab("Other");
  const owner = lab.ctx("owner");
  const sample = await createSample({ ctx: owner, input: { name: "GX sweep", material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } });
  sampleId = sample.id;
  const tip = await createTip({ ctx: owner, input: { label: "W-1", material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: 0.1 } });
  sessionId = (await createSession({ ctx: owner, input: { sampleId, tipId: tip.id, label: "approach", date: "2026-11-20", temperature_K: 4.5 } })).id;
  worker = await startWorkerProcess();
}, 60_000);

afterAll(async () => {
  await stopWorkerProcess(worker);
  await stopBoss();
  await closeDb();
});

describe("a field sweep through the pipeline", () => {
  it("processes 20 presigned uploads and finds the critical field of the model within 0.05 V/nm, inside its 95% interval", async () => {
    for (const f of files) ids.push((await uploadFile(lab.ctx("microscopist"), sessionId, f.name, f.bytes)).id);
    const rows = await waitForUploads(ids);
    expect(rows.map((r) => r.status)).toEqual(Array(20).fill("done"));
    expect(rows.every((r) => r.spectraCount === 1)).toBe(true);

    const phase = await getPhase({ ctx: lab.ctx("collaborator"), input: { sampleId } });
    expect(phase.points).toHaveLength(20);
    const c = phase.crossing;
    expect(c.state).toBe("crossed");
    expect(c.found).toBe(true);
    // Truth from the generating model (makeSweep's default critical field, 0.98 V/nm).
    expect(Math.abs(c.field_V_per_nm! - sweep.truth.criticalField_V_per_nm)).toBeLessThan(0.05);
    expect(c.ci95_V_per_nm![0]).toBeLessThanOrEqual(sweep.truth.criticalField_V_per_nm);
    expect(c.ci95_V_per_nm![1]).toBeGreaterThanOrEqual(sweep.truth.criticalField_V_per_nm);
  });

  it("stores for every spectrum its arrays, the pick with its settings version, the field with its model version and the raw file's hash", async () => {
    const s = await getSpectrum({ ctx: lab.ctx("analyst"), input: { id: (await getUpload({ ctx: lab.ctx("owner"), input: { id: ids[5] } })).spectrumIds[0] } });
    expect(s.upload.sha256).toBe(sha256(files[5].bytes));
    expect(s.arrays.bias_V).toHaveLength(sweep.spectra[5].bias_V.length);
    expect(s.pick?.source).toBe("auto");
    expect(s.versions.extractionSettings?.version).toBe(1);
    expect(s.versions.fieldModel?.version).toBe(1);
    // The stored field is the design's model evaluated at the file's setpoint (lib/spectra/field.ts).
    const expected = estimateField(resolveFieldModel({ tipWorkFunction_eV: 4.7, sampleWorkFunction_eV: 3.9 }), sweep.spectra[5].meta);
    expect(s.field_V_per_nm).toBeCloseTo(expected.field_V_per_nm, 9);
    expect(s.fieldSigma_V_per_nm).toBeGreaterThan(0);
  });

  it("recognises the same file uploaded again and does not store it twice", async () => {
    const again = await createUploads({ ctx: lab.ctx("owner"), input: { sessionId, files: [{ name: "renamed.csv", size: files[3].bytes.length, sha256: sha256(files[3].bytes) }] } });
    expect(again.uploads[0]).toMatchObject({ id: ids[3], duplicate: true, url: null });
    const [{ n }] = (await db().execute(`select count(*)::int as n from uploads where lab_id = '${lab.lab.id}'`)).rows as { n: number }[];
    expect(n).toBe(20);
  });

  it("completing an upload twice queues it once (idempotent)", async () => {
    const again = await completeUpload({ ctx: lab.ctx("owner"), input: { id: ids[0] } });
    expect(again.status).toBe("done");
    expect(await db().select().from(spectra).where(eq(spectra.uploadId, ids[0]))).toHaveLength(1);
  });

  it("tagging a setpoint re-estimates distance and field at once", async () => {
    const list = await listSessionSpectra({ ctx: lab.ctx("microscopist"), input: { sessionId, query: { page: 1, pageSize: 5, sort: "setpointCurrent", dir: "asc" } } });
    expect(list.total).toBe(20);
    expect(list.rows).toHaveLength(5);
    const row = list.rows[0];
    await tagSpectra({ ctx: lab.ctx("microscopist"), input: { ids: [row.id], patch: { setpointCurrent_A: row.setpointCurrent_A! * 100, region: "terrace B" } } });
    const after = await getSpectrum({ ctx: lab.ctx("owner"), input: { id: row.id } });
    // Two decades more current at the same bias: the tip is closer, so the field is larger.
    expect(after.field_V_per_nm!).toBeGreaterThan(row.field_V_per_nm!);
    expect(after.metadata.region).toBe("terrace B");
    const filtered = await listSessionSpectra({ ctx: lab.ctx("owner"), input: { sessionId, query: { page: 1, pageSize: 50, sort: "index", dir: "asc", region: "terrace B" } } });
    expect(filtered.rows.map((r) => r.id)).toEqual([row.id]);
  });

  it("a new field model version re-estimates every field in the background", async () => {
    const before = await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } });
    const saved = await saveFieldModel({ ctx: lab.ctx("analyst"), input: { sampleId, model: { contactDistance_nm: 0.35, contactDistanceSigma_nm: 0.05 } } });
    expect(saved.version).toBe(2);
    const deadline = Date.now() + 30_000;
    for (;;) {
      const [run] = await db().select().from(analysisRuns).where(eq(analysisRuns.id, saved.runId));
      if (run.status === "done") break;
      if (Date.now() > deadline) throw new Error(`re-analysis still ${run.status}`);
      await new Promise((r) => setTimeout(r, 200));
    }
    const after = await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } });
    // A larger contact distance puts every spectrum farther away: every field gets smaller.
    const byId = new Map(before.points.map((p) => [p.spectrumId, p.field_V_per_nm]));
    expect(after.points.every((p) => p.field_V_per_nm < byId.get(p.spectrumId)!)).toBe(true);
    expect(after.crossing.fieldModelVersionId).toBe(saved.id);
  });

  it("refuses invalid settings with a field error and keeps the old version", async () => {
    const err = (await rejection(saveExtractionSettings({ ctx: lab.ctx("analyst"), input: { sampleId, settings: { threshold: { k: -1 } } } }))) as { status: number; message: string };
    expect(err.status).toBe(422);
    expect(err.message).toContain("threshold.k");
  });
});

describe("bad files and crashes", () => {
  it("a malformed file fails with the parser's message naming the line, and its raw bytes are kept", async () => {
    const bad = bytesOf("bias (V),dI/dV (a.u.)\n" + Array.from({ length: 20 }, (_, i) => `${i * 0.01},${i === 7 ? "abc" : 1}`).join("\n"));
    const { id } = await uploadFile(lab.ctx("owner"), sessionId, "broken.csv", bad);
    const [row] = await waitForUploads([id]);
    expect(row.status).toBe("failed");
    expect(row.message).toMatch(/line 9/i);
    expect(await db().select().from(spectra).where(eq(spectra.uploadId, id))).toHaveLength(0);
    expect(await objectSize(row.storageKey)).toBe(bad.length);
    // A file that cannot be read is not offered a retry (the same bytes fail the same way).
    expect((await getUpload({ ctx: lab.ctx("owner"), input: { id } })).retryable).toBe(false);
    // Retrying a failed file re-reads the kept bytes (and fails the same way).
    await retryUpload({ ctx: lab.ctx("owner"), input: { id } });
    const [again] = await waitForUploads([id], { until: ["failed"] });
    expect(again.attempts).toBe(2);
  });

  it("a worker killed mid-job leaves the job to be retried and completed by another, with nothing stored twice", async () => {
    await stopWorkerProcess(worker);
    const hanging = await startWorkerProcess({ WORKER_FAULT: "hang-after-parse" });
    const sweep2 = makeSweep({ n: 3, seed: 77 });
    const bytes = bytesOf(spectrumToCsv(sweep2.spectra[1]));
    const { id } = await uploadFile(lab.ctx("owner"), sessionId, "crash.csv", bytes);
    await waitForUploads([id], { until: ["processing"], timeoutMs: 20_000 });
    await stopWorkerProcess(hanging, "SIGKILL");
    worker = await startWorkerProcess();
    const [row] = await waitForUploads([id], { timeoutMs: 45_000 });
    expect(row.status).toBe("done");
    expect(row.attempts).toBeGreaterThanOrEqual(2);
    expect(await db().select().from(spectra).where(eq(spectra.uploadId, id))).toHaveLength(1);
  }, 90_000);

  it("two runs of one file at once (a job retried while the first still works) store it once, and a later run changes nothing", async () => {
    const bytes = bytesOf(spectrumToCsv(makeSweep({ n: 3, seed: 78 }).spectra[0]));
    const { id } = await uploadFile(lab.ctx("owner"), sessionId, "twice.csv", bytes);
    // The worker may take the queued job too: at most one of all the runs stores the file.
    const outcomes = await Promise.all([processUpload({ ctx: system(), input: { uploadId: id } }), processUpload({ ctx: system(), input: { uploadId: id } })]);
    expect(outcomes.filter((o) => o.status === "done").length).toBeLessThanOrEqual(1);
    expect(outcomes.every((o) => o.status === "done" || (o.status === "skipped" && /already done/.test(o.reason)))).toBe(true);
    const stored = await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.uploadId, id));
    expect(stored).toHaveLength(1);
    expect(await processUpload({ ctx: system(), input: { uploadId: id } })).toEqual({ status: "skipped", reason: "already done" });
    const [row] = await waitForUploads([id]);
    expect(row.status).toBe("done");
    expect(await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.uploadId, id))).toEqual(stored);
  });

  it("a run that read the file's row just before another run stored it leaves the stored file as it is", async () => {
    const bytes = bytesOf(spectrumToCsv(makeSweep({ n: 3, seed: 79 }).spectra[1]));
    const { id } = await uploadFile(lab.ctx("owner"), sessionId, "late.csv", bytes);
    let first: Awaited<ReturnType<typeof processUpload>> | undefined;
    // The late run reads the row (not done), then another run stores the whole file before it goes on.
    const late = await processUpload({ ctx: system({ afterRead: async () => void (first = await processUpload({ ctx: system(), input: { uploadId: id } })) }), input: { uploadId: id } });
    const stored = await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.uploadId, id));
    expect(stored).toHaveLength(1);
    // The queued job may have stored it first; either way exactly one run stored it.
    expect([first?.status, late.status].filter((s) => s === "done").length).toBeLessThanOrEqual(1);
    expect(late.status).toBe("skipped");
    const [row] = await waitForUploads([id]);
    expect(row.status).toBe("done");
    expect(await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.uploadId, id))).toEqual(stored);
  });
});

describe("who may do what in the pipeline", () => {
  it("a collaborator is refused every write", async () => {
    const c = lab.ctx("collaborator");
    const [s] = await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.sessionId, sessionId)).limit(1);
    const attempts = [
      () => createUploads({ ctx: c, input: { sessionId, files: [{ name: "x.csv", size: 10, sha256: "a".repeat(64) }] } }),
      () => completeUpload({ ctx: c, input: { id: ids[1] } }),
      () => retryUpload({ ctx: c, input: { id: ids[1] } }),
      () => tagSpectra({ ctx: c, input: { ids: [s.id], patch: { region: "x" } } }),
      () => saveFieldModel({ ctx: c, input: { sampleId, model: { contactDistance_nm: 0.2 } } }),
      () => saveExtractionSettings({ ctx: c, input: { sampleId, settings: {} } }),
    ];
    for (const a of attempts) expect((await rejection(a())).status).toBe(403);
  });

  it("another lab's owner gets 404 for this lab's uploads, spectra, phase and session", async () => {
    const o = other.ctx("owner");
    const [s] = await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.sessionId, sessionId)).limit(1);
    const attempts = [
      () => getUpload({ ctx: o, input: { id: ids[1] } }),
      () => completeUpload({ ctx: o, input: { id: ids[1] } }),
      () => getSpectrum({ ctx: o, input: { id: s.id } }),
      () => getPhase({ ctx: o, input: { sampleId } }),
      () => tagSpectra({ ctx: o, input: { ids: [s.id], patch: { region: "x" } } }),
      () => createUploads({ ctx: o, input: { sessionId, files: [{ name: "x.csv", size: 10, sha256: "b".repeat(64) }] } }),
      () => listSessionSpectra({ ctx: o, input: { sessionId, query: { page: 1, pageSize: 10, sort: "index", dir: "asc" } } }),
      () => saveFieldModel({ ctx: o, input: { sampleId, model: { contactDistance_nm: 0.2 } } }),
    ];
    for (const a of attempts) expect((await rejection(a())).status).toBe(404);
  });

  it("a file above the size limit is refused with 413 before anything is stored", async () => {
    const before = await db().select().from(uploads).where(and(eq(uploads.labId, lab.lab.id)));
    const err = await rejection(createUploads({ ctx: lab.ctx("owner"), input: { sessionId, files: [{ name: "huge.csv", size: 10 ** 10, sha256: "c".repeat(64) }] } }));
    expect(err.status).toBe(413);
    expect(err.message).toContain("huge.csv");
    expect(await db().select().from(uploads).where(eq(uploads.labId, lab.lab.id))).toHaveLength(before.length);
    expect(await db().select().from(gapPicks).where(eq(gapPicks.labId, other.lab.id))).toHaveLength(0);
  });
});
