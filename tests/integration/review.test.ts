import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { crossings, gapPicks, spectra } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { methodsText } from "@/lib/services/exports/methodsText";
import { phaseCsv } from "@/lib/services/exports/phaseCsv";
import { correctPick } from "@/lib/services/picks/correctPick";
import { pickHistoryOf } from "@/lib/services/picks/pickHistoryOf";
import { setExcluded } from "@/lib/services/picks/setExcluded";
import { undoPickChange } from "@/lib/services/picks/undoPickChange";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { getPhase } from "@/lib/services/spectra/getPhase";
import { getSpectrum } from "@/lib/services/spectra/getSpectrum";
import { tagSpectra } from "@/lib/services/spectra/tagSpectra";
import { createTip } from "@/lib/services/tips/createTip";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { makeSweep, spectrumToCsv } from "@/lib/spectra";
import { makeLab, rejection, type LabFixture, system } from "../support/fixtures";
import { bytesOf, uploadFile } from "../support/pipeline";

/** Review of band edges: corrections with reasons and history, stale saves, exclusion, undo, exports. */
let lab: LabFixture;
let other: LabFixture;
let sampleId: string;
let ids: string[] = [];

beforeAll(async () => {
  lab = await makeLab("Review");
  other = await makeLab("Review other");
  const owner = lab.ctx("owner");
  sampleId = (await createSample({ ctx: owner, input: { name: "Review sweep", material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } })).id;
  const tip = await createTip({ ctx: owner, input: { label: "W-r", material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: 0.1 } });
  const sessionId = (await createSession({ ctx: owner, input: { sampleId, tipId: tip.id, label: "review", date: "2026-11-21", temperature_K: 4.5 } })).id;
  const sweep = makeSweep({ n: 12, seed: 5 });
  for (const [i, s] of sweep.spectra.entries()) {
    const { id } = await uploadFile(owner, sessionId, `r-${i}.csv`, bytesOf(spectrumToCsv({ ...s, meta: { ...s.meta, region: i === 0 ? "=cmd|' /C calc'!A0" : "terrace A" } })));
    // Processed here, in this process, so the test does not depend on a worker's timing.
    await processUpload({ ctx: system(), input: { uploadId: id } });
  }
  const rows = await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.sampleId, sampleId)).orderBy(spectra.fieldVPerNm);
  ids = rows.map((r) => r.id);
}, 60_000);

afterAll(async () => {
  await stopBoss();
  await closeDb();
});

describe("correcting band edges", () => {
  it("keeps the automatic pick, records who, when, old → new and why, and refits the sample", async () => {
    const before = await getSpectrum({ ctx: lab.ctx("analyst"), input: { id: ids[2] } });
    const p = before.pick!;
    const { pick, crossing } = await correctPick({ ctx: lab.ctx("analyst"), input: { spectrumId: ids[2], body: { vbEdge_V: p.vbEdge_V! - 0.01, cbEdge_V: p.cbEdge_V! + 0.01, reason: "onset hidden by a tip state", version: p.version } } });
    expect(pick.source).toBe("corrected");
    expect(pick.version).toBe(p.version + 1);
    expect(pick.gapEv).toBeCloseTo(p.gap_eV! + 0.02, 9);
    expect((pick.autoPick as { vbEdge_V: number }).vbEdge_V).toBeCloseTo(p.vbEdge_V!, 12);
    expect(crossing.sampleId).toBe(sampleId);
    const history = await pickHistoryOf({ ctx: lab.ctx("collaborator"), input: { spectrumId: ids[2] } });
    expect(history[0]).toMatchObject({ action: "correct", reason: "onset hidden by a tip state", actorName: lab.people.analyst.name });
    expect((history[0].before as { vbEdgeV: number }).vbEdgeV).toBeCloseTo(p.vbEdge_V!, 12);
    const phase = await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } });
    expect(phase.points.find((x) => x.spectrumId === ids[2])?.source).toBe("corrected");
  });

  it("a stale save gets 409 naming who changed the pick and when; nothing is overwritten", async () => {
    const s = await getSpectrum({ ctx: lab.ctx("owner"), input: { id: ids[3] } });
    const v = s.pick!.version;
    await correctPick({ ctx: lab.ctx("analyst"), input: { spectrumId: ids[3], body: { vbEdge_V: s.pick!.vbEdge_V! - 0.005, cbEdge_V: s.pick!.cbEdge_V!, reason: "first analyst", version: v } } });
    const err = (await rejection(correctPick({ ctx: lab.ctx("owner"), input: { spectrumId: ids[3], body: { vbEdge_V: -0.2, cbEdge_V: 0.2, reason: "second analyst", version: v } } }))) as { status: number; message: string; details?: { updatedBy: string; currentVersion: number } };
    expect(err.status).toBe(409);
    expect(err.message).toContain(lab.people.analyst.name);
    expect(err.details?.currentVersion).toBe(v + 1);
    const [row] = await db().select().from(gapPicks).where(eq(gapPicks.spectrumId, ids[3]));
    expect(row.vbEdgeV).toBeCloseTo(s.pick!.vbEdge_V! - 0.005, 12);
  });

  it("refuses edges in the wrong order or outside the measured bias, with 422", async () => {
    const s = await getSpectrum({ ctx: lab.ctx("owner"), input: { id: ids[4] } });
    expect((await rejection(correctPick({ ctx: lab.ctx("analyst"), input: { spectrumId: ids[4], body: { vbEdge_V: 0.1, cbEdge_V: -0.1, reason: "wrong way", version: s.pick!.version } } }))).status).toBe(422);
    expect((await rejection(correctPick({ ctx: lab.ctx("analyst"), input: { spectrumId: ids[4], body: { vbEdge_V: -5, cbEdge_V: 0.1, reason: "far out", version: s.pick!.version } } }))).status).toBe(422);
    expect((await rejection(correctPick({ ctx: lab.ctx("analyst"), input: { spectrumId: ids[4], body: { vbEdge_V: -0.1, cbEdge_V: 0.1, reason: "", version: s.pick!.version } } }))).status).toBe(422);
  });

  it("exclusion takes a spectrum out of the fit and undo brings it back", async () => {
    const n0 = (await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } })).crossing as { n?: number };
    const s = await getSpectrum({ ctx: lab.ctx("owner"), input: { id: ids[6] } });
    const ex = await setExcluded({ ctx: lab.ctx("analyst"), input: { spectrumId: ids[6], body: { excluded: true, reason: "tip change during sweep", version: s.pick!.version } } });
    expect(ex.pick.excluded).toBe(true);
    expect(ex.crossing.nPoints).toBe((n0.n ?? 0) - 1);
    const undone = await undoPickChange({ ctx: lab.ctx("analyst"), input: { spectrumId: ids[6], body: { version: ex.pick.version } } });
    expect(undone.pick.excluded).toBe(false);
    expect(undone.crossing.nPoints).toBe(n0.n ?? 0);
    expect((await pickHistoryOf({ ctx: lab.ctx("owner"), input: { spectrumId: ids[6] } })).map((h) => h.action)).toEqual(["undo", "exclude"]);
  });

  it("collaborators and other labs cannot change picks", async () => {
    const s = await getSpectrum({ ctx: lab.ctx("owner"), input: { id: ids[7] } });
    const body = { vbEdge_V: -0.05, cbEdge_V: 0.05, reason: "not mine", version: s.pick!.version };
    expect((await rejection(correctPick({ ctx: lab.ctx("collaborator"), input: { spectrumId: ids[7], body } }))).status).toBe(403);
    expect((await rejection(correctPick({ ctx: lab.ctx("microscopist"), input: { spectrumId: ids[7], body } }))).status).toBe(403);
    expect((await rejection(correctPick({ ctx: other.ctx("owner"), input: { spectrumId: ids[7], body } }))).status).toBe(404);
    expect((await rejection(setExcluded({ ctx: other.ctx("owner"), input: { spectrumId: ids[7], body: { excluded: true, reason: "x x x", version: 1 } } }))).status).toBe(404);
  });
});

describe("refits", () => {
  it("a refit that changes nothing adds no crossing row; one that moves a point does", async () => {
    const count = async () => (await db().select({ id: crossings.id }).from(crossings).where(eq(crossings.sampleId, sampleId))).length;
    const n0 = await count();
    await tagSpectra({ ctx: lab.ctx("owner"), input: { ids: [ids[8]], patch: { region: "terrace C" } } });
    expect(await count()).toBe(n0);
    const s = await getSpectrum({ ctx: lab.ctx("owner"), input: { id: ids[8] } });
    await correctPick({ ctx: lab.ctx("analyst"), input: { spectrumId: ids[8], body: { vbEdge_V: s.pick!.vbEdge_V! - 0.004, cbEdge_V: s.pick!.cbEdge_V!, reason: "moves one point", version: s.pick!.version } } });
    expect(await count()).toBe(n0 + 1);
  });
});

describe("exports", () => {
  it("phase CSV carries versions and raw-file hashes and neutralises formula-like text", async () => {
    const { text } = await phaseCsv({ ctx: lab.ctx("collaborator"), input: { sampleId } });
    const lines = text.trim().split("\r\n");
    const header = lines[0].split(",");
    expect(lines).toHaveLength(13);
    for (const col of ["raw_sha256", "extraction_settings_version", "field_model_version", "field_V_per_nm", "gap_eV"]) expect(header).toContain(col);
    expect(text).toContain("'=cmd|");
    expect(text).not.toMatch(/(^|,)=cmd/m);
    const row = lines[1].split(",");
    expect(row[header.indexOf("raw_sha256")]).toMatch(/^[0-9a-f]{64}$/);
  });

  it("the methods paragraph is written from the settings in use", async () => {
    await tagSpectra({ ctx: lab.ctx("owner"), input: { ids: [ids[0]], patch: { region: "terrace A" } } });
    const { text } = await methodsText({ ctx: lab.ctx("owner"), input: { sampleId } });
    expect(text).toContain("extraction settings version 1");
    expect(text).toContain("3σ for at least 3 consecutive points in a rise sustained over 40 mV");
    expect(text).toContain("robust polynomial (degree up to 2");
    expect(text).toContain("d_c = 0.25 ± 0.05 nm");
    expect(text).toContain("Savitzky and Golay, Anal. Chem. 36, 1627 (1964)");
  });
});
