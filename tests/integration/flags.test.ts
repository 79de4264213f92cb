import type { ChildProcess } from "node:child_process";
import { desc, eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { analysisRuns, crossings, gapPicks, spectra } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { reanalyzeSample } from "@/lib/services/analysis/reanalyzeSample";
import { methodsText } from "@/lib/services/exports/methodsText";
import { phaseCsv } from "@/lib/services/exports/phaseCsv";
import { setFlaggedInFit } from "@/lib/services/labs/setFlaggedInFit";
import { correctPick } from "@/lib/services/picks/correctPick";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { getPhaseJson } from "@/lib/services/spectra/getPhaseJson";
import { getPhase } from "@/lib/services/spectra/getPhase";
import { getSpectrum } from "@/lib/services/spectra/getSpectrum";
import { listSessionSpectra } from "@/lib/services/spectra/listSessionSpectra";
import { createTip } from "@/lib/services/tips/createTip";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { makeSweep, spectrumToCsv, type QualityFlag } from "@/lib/spectra";
import { parseCsv } from "../support/csv";
import { makeLab, rejection, withSpikeAtZero, type LabFixture, system } from "../support/fixtures";
import { bytesOf, startWorkerProcess, stopWorkerProcess, uploadFile } from "../support/pipeline";

/**
 * Quality flags from the picker to every place a pick is read: stored with the automatic pick,
 * kept through a correction, replaced by a re-analysis, in the spectrum and phase answers, the
 * session's table and its filter, the phase CSV, and the lab's setting that leaves flagged
 * automatic picks out of the critical-field fit (a background refit of every sample).
 * The sweep comes from lib/spectra/synthetic.ts; three of its spectra get a single-point spike of
 * +3 (about half the spectrum's maximum) at 0 V, which the picker removes and flags as a glitch.
 */
process.env.JOB_EXPIRE_SECONDS = "4";

let lab: LabFixture;
let sampleId: string;
let sessionId: string;
let worker: ChildProcess | undefined;
/** Spectrum ids by index in the sweep. */
const ids: string[] = [];
const GLITCHED = [2, 5, 8];

const pickOf = async (i: number) => (await db().select().from(gapPicks).where(eq(gapPicks.spectrumId, ids[i])))[0];
const codes = (flags: readonly QualityFlag[]) => flags.map((f) => f.code);

async function waitForRuns(runIds: string[], timeoutMs = 45_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const runs = await db().select().from(analysisRuns).where(inArray(analysisRuns.id, runIds));
    if (runs.every((r) => r.status === "done")) return runs;
    if (Date.now() > deadline) throw new Error(`refit runs still ${runs.map((r) => r.status).join(", ")}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

const latestCrossing = async () => (await db().select().from(crossings).where(eq(crossings.sampleId, sampleId)).orderBy(desc(crossings.createdAt)).limit(1))[0];

beforeAll(async () => {
  lab = await makeLab("Flags");
  const owner = lab.ctx("owner");
  sampleId = (await createSample({ ctx: owner, input: { name: "Flagged sweep", material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } })).id;
  const tip = await createTip({ ctx: owner, input: { label: "W-f", material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: 0.1 } });
  sessionId = (await createSession({ ctx: owner, input: { sampleId, tipId: tip.id, label: "flags", date: "2026-11-24", temperature_K: 4.5 } })).id;
  for (const [i, s] of makeSweep({ n: 12, seed: 5 }).spectra.entries()) {
    const spectrum = GLITCHED.includes(i) ? withSpikeAtZero(s) : s;
    const { id } = await uploadFile(owner, sessionId, `f-${String(i).padStart(2, "0")}.csv`, bytesOf(spectrumToCsv(spectrum)));
    await processUpload({ ctx: system(), input: { uploadId: id } });
    ids.push((await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.uploadId, id)))[0].id);
  }
  worker = await startWorkerProcess();
}, 90_000);

afterAll(async () => {
  await stopWorkerProcess(worker);
  await stopBoss();
  await closeDb();
});

describe("stored with the pick", () => {
  it("an upload stores the automatic pick's flags beside it, with where the glitch was and the settings version", async () => {
    for (let i = 0; i < ids.length; i++) {
      const p = await pickOf(i);
      expect(p.settingsVersionId).not.toBeNull();
      // The column is the automatic pick's own list.
      expect(p.flags).toEqual((p.autoPick as { flags: QualityFlag[] }).flags);
      if (GLITCHED.includes(i)) {
        const glitch = p.flags.find((f) => f.code === "glitch");
        expect(glitch?.message).toContain("0 mV");
        expect(glitch?.at_V).toEqual([expect.closeTo(0, 6)]);
      } else expect(codes(p.flags)).not.toContain("glitch");
    }
  });

  it("a correction keeps the flags (they describe the data) and the spectrum answer says it was corrected", async () => {
    const before = await getSpectrum({ ctx: lab.ctx("analyst"), input: { id: ids[5] } });
    expect(codes(before.pick!.flags)).toContain("glitch");
    const p = before.pick!;
    await correctPick({ ctx: lab.ctx("analyst"), input: { spectrumId: ids[5], body: { vbEdge_V: p.vbEdge_V! - 0.003, cbEdge_V: p.cbEdge_V!, reason: "checked by eye after the spike", version: p.version } } });
    const after = await getSpectrum({ ctx: lab.ctx("collaborator"), input: { id: ids[5] } });
    expect(after.pick!.source).toBe("corrected");
    expect(after.pick!.flags).toEqual(before.pick!.flags);
  });

  it("a re-analysis writes the new automatic pick's flags, for corrected picks too", async () => {
    // Wipe two stored lists (one automatic, one corrected): a re-analysis must bring them back.
    await db().update(gapPicks).set({ flags: [] }).where(inArray(gapPicks.spectrumId, [ids[2], ids[5]]));
    await reanalyzeSample({ ctx: system(), input: { sampleId } });
    expect(codes((await pickOf(2)).flags)).toContain("glitch");
    const corrected = await pickOf(5);
    expect(corrected.source).toBe("corrected");
    expect(codes(corrected.flags)).toContain("glitch");
  });
});

describe("in the API answers, the table and the export", () => {
  it("GET /spectra/{id} and the phase answer carry flags per pick", async () => {
    const s = await getSpectrum({ ctx: lab.ctx("collaborator"), input: { id: ids[8] } });
    expect(codes(s.pick!.flags)).toContain("glitch");
    expect(s.pick!.excludedByFlag).toBe(false);
    // The next flagged spectrum in review order, and how many there are.
    expect(s.neighbours.flagged).toBeGreaterThanOrEqual(GLITCHED.length);
    expect(s.neighbours.nextFlagged).not.toBeNull();
    expect(s.neighbours.nextFlagged).not.toBe(ids[8]);
    const { body } = await getPhaseJson({ ctx: lab.ctx("collaborator"), input: { sampleId } });
    const phase = JSON.parse(body!) as { points: { spectrumId: string; flags: QualityFlag[]; excludedByFlag: boolean; source: string }[] };
    expect(phase.points).toHaveLength(12);
    for (const [i, id] of ids.entries()) {
      const pt = phase.points.find((x) => x.spectrumId === id)!;
      expect(codes(pt.flags).includes("glitch")).toBe(GLITCHED.includes(i));
      expect(pt.excludedByFlag).toBe(false);
    }
  });

  it("the session's table filters on the server by flagged, not flagged and a flag's code", async () => {
    const list = (flag?: "flagged" | "unflagged" | "glitch" | "clipped") => listSessionSpectra({ ctx: lab.ctx("microscopist"), input: { sessionId, query: { page: 1, pageSize: 50, sort: "index", dir: "asc", flag } } });
    const all = await list();
    const flaggedIds = all.rows.filter((r) => r.flags!.length > 0).map((r) => r.id).sort();
    const glitched = GLITCHED.map((i) => ids[i]).sort();
    expect(flaggedIds).toEqual(expect.arrayContaining(glitched));
    const flagged = await list("flagged");
    expect(flagged.total).toBe(flaggedIds.length);
    expect(flagged.rows.map((r) => r.id).sort()).toEqual(flaggedIds);
    const unflagged = await list("unflagged");
    expect(unflagged.total).toBe(12 - flaggedIds.length);
    expect(unflagged.rows.every((r) => r.flags!.length === 0)).toBe(true);
    const glitch = await list("glitch");
    expect(glitch.rows.map((r) => r.id).sort()).toEqual(glitched);
    expect(glitch.total).toBe(3);
  });

  it("the phase CSV has a flags column (codes, `;`-separated, empty when none) and the flag messages", async () => {
    const { text } = await phaseCsv({ ctx: lab.ctx("collaborator"), input: { sampleId } });
    const rows = new Map(parseCsv(text).map((r) => [r.spectrum_id, r]));
    expect(rows.size).toBe(12);
    for (const [i, id] of ids.entries()) {
      const row = rows.get(id)!;
      const stored = (await pickOf(i)).flags;
      expect(row.flags).toBe(stored.map((f) => f.code).join(";"));
      if (GLITCHED.includes(i)) {
        expect(row.flags.split(";")).toContain("glitch");
        expect(row.flag_messages).toContain("single-point spike replaced before picking, at 0 mV");
      }
      if (stored.length === 0) expect([row.flags, row.flag_messages]).toEqual(["", ""]);
      expect(row.excluded_by_flag).toBe("false");
    }
  });
});

describe("the lab setting: flagged spectra in the critical-field fit", () => {
  it("only owners may change it", async () => {
    expect((await rejection(setFlaggedInFit({ ctx: lab.ctx("analyst"), input: { flaggedInFit: "exclude" } }))).status).toBe(403);
    expect((await rejection(setFlaggedInFit({ ctx: lab.ctx("owner"), input: { flaggedInFit: "sometimes" } }))).status).toBe(422);
  });

  it("`exclude` refits every sample in the background without the flagged automatic picks; corrected ones stay in; `include` brings them back", async () => {
    const everyone = (await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } })).points;
    const inFit = everyone.filter((p) => !p.excluded);
    const flaggedAuto = inFit.filter((p) => p.flags.length > 0 && p.source === "auto");
    expect(flaggedAuto.length).toBeGreaterThanOrEqual(2); // spectra 2 and 8 (5 is corrected)
    expect((await latestCrossing()).nPoints).toBe(inFit.length);

    const saved = await setFlaggedInFit({ ctx: lab.ctx("owner"), input: { flaggedInFit: "exclude" } });
    expect(saved.changed).toBe(true);
    expect(saved.runIds).toHaveLength(1);
    await waitForRuns(saved.runIds);
    expect((await latestCrossing()).nPoints).toBe(inFit.length - flaggedAuto.length);
    const after = (await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } })).points;
    expect(after.filter((p) => p.excludedByFlag).map((p) => p.spectrumId).sort()).toEqual(flaggedAuto.map((p) => p.spectrumId).sort());
    // The corrected glitched spectrum still enters: an analyst has looked at it.
    expect(after.find((p) => p.spectrumId === ids[5])).toMatchObject({ source: "corrected", excludedByFlag: false });
    expect((await getSpectrum({ ctx: lab.ctx("owner"), input: { id: ids[2] } })).pick!.excludedByFlag).toBe(true);
    const csvRows = parseCsv((await phaseCsv({ ctx: lab.ctx("owner"), input: { sampleId } })).text);
    expect(csvRows.find((r) => r.spectrum_id === ids[2])?.excluded_by_flag).toBe("true");
    expect((await methodsText({ ctx: lab.ctx("owner"), input: { sampleId } })).text).toMatch(/left out of the fit/);

    // The same value again changes nothing and queues nothing.
    expect(await setFlaggedInFit({ ctx: lab.ctx("owner"), input: { flaggedInFit: "exclude" } })).toMatchObject({ changed: false, runIds: [] });

    const back = await setFlaggedInFit({ ctx: lab.ctx("owner"), input: { flaggedInFit: "include" } });
    await waitForRuns(back.runIds);
    expect((await latestCrossing()).nPoints).toBe(inFit.length);
    expect((await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } })).points.some((p) => p.excludedByFlag)).toBe(false);
  });
});
