import { and, eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { gapPicks, spectra, spectrumAverageMembers } from "@/db/schema";
import { reanalyzeSample } from "@/lib/services/analysis/reanalyzeSample";
import { saveExtractionSettings } from "@/lib/services/analysis/saveExtractionSettings";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { createAverage } from "@/lib/services/spectra/createAverage";
import { getPhase } from "@/lib/services/spectra/getPhase";
import { getSpectrum } from "@/lib/services/spectra/getSpectrum";
import { putBackMember } from "@/lib/services/spectra/putBackMember";
import { undoAverage } from "@/lib/services/spectra/undoAverage";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { columnsToCsv, makeRepeats, makeSpectrum } from "@/lib/spectra";
import { makeLab, rejection, system, type LabFixture } from "../support/fixtures";
import { bytesOf, sha256, uploadFile } from "../support/pipeline";

/**
 * Repeats averaged and spectra normalised, through upload processing and the verbs: a file of four
 * repeats (`# repeats: 4`, the physical model's makeRepeats, a tip change before the fourth) gives
 * one average with its members, its standard error and its pick; the members leave the phase plot
 * and the fit while it stands; refusals store nothing; undo and put-back; a Feenstra settings version
 * re-picks on the normalised view and the pick records it.
 */
let lab: LabFixture;
let sampleId: string;
let otherSampleId: string;
let sessionId: string;
let otherSessionId: string;
let fileSha: string;
const meta = { setpoint_bias_V: 0.5, setpoint_current_A: 1e-10, temperature_K: 4.5, lockin_modulation_mV_rms: 2, x_nm: 4, y_nm: 2 };
const model = { vbEdge_V: -0.12, cbEdge_V: 0.18, T_K: 4.5, vrms_mV: 2, noise: 0.03, seed: 43 };

async function upload(session: string, name: string, text: string) {
  const bytes = bytesOf(text);
  const { id } = await uploadFile(lab.ctx("owner"), session, name, bytes);
  await processUpload({ ctx: system(), input: { uploadId: id } });
  return { id, sha: sha256(bytes) };
}
const rowsOf = (uploadId: string) =>
  db().select({ id: spectra.id, kind: spectra.kind, index: spectra.indexInFile }).from(spectra).where(eq(spectra.uploadId, uploadId)).orderBy(spectra.indexInFile);
const averagesOf = async (sample: string) =>
  (await db().select({ id: spectra.id }).from(spectra).where(and(eq(spectra.sampleId, sample), eq(spectra.kind, "average")))).map((r) => r.id);

let members: string[];
let average: string;
beforeAll(async () => {
  lab = await makeLab("Prepare");
  const owner = lab.ctx("owner");
  const sample = { material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 };
  sampleId = (await createSample({ ctx: owner, input: { name: "Averaged", ...sample } })).id;
  otherSampleId = (await createSample({ ctx: owner, input: { name: "Other", ...sample } })).id;
  sessionId = (await createSession({ ctx: owner, input: { sampleId, label: "repeats", date: "2026-12-05", temperature_K: 4.5 } })).id;
  otherSessionId = (await createSession({ ctx: owner, input: { sampleId: otherSampleId, label: "o", date: "2026-12-05", temperature_K: 4.5 } })).id;
  const reps = makeRepeats(model, 4, { after: 3, edgeShift_V: 0.03, amplitudeFactor: 1.3 });
  const csv = columnsToCsv(reps[0].bias_V, reps.map((r, k) => ({ label: `dI/dV sweep ${k + 1}`, didv: r.didv })), meta);
  const up = await upload(sessionId, "four-repeats.csv", `# repeats: 4\n${csv}`);
  fileSha = up.sha;
  const rows = await rowsOf(up.id);
  members = rows.filter((r) => r.kind === "measured").map((r) => r.id);
  average = rows.find((r) => r.kind === "average")!.id;
}, 60_000);

afterAll(async () => {
  await closeDb();
});

describe("a file of repeats at upload", () => {
  it("keeps the four repeats and adds one average with its members, its standard error and its pick", async () => {
    expect(members).toHaveLength(4);
    const a = await getSpectrum({ ctx: lab.ctx("collaborator"), input: { id: average } });
    expect(a.kind).toBe("average");
    expect(a.average!.members.map((m) => m.id)).toEqual(members);
    expect(a.average!.members.map((m) => m.used)).toEqual([true, true, true, false]);
    expect(a.average!.members[3].leftOutReason).toMatch(/differs from the other repeats beyond their noise/);
    expect(a.average!.members.every((m) => m.rawSha256 === fileSha)).toBe(true);
    expect(a.average!.description).toMatch(/mean of 3 of 4 repeats/);
    expect(a.arrays.stderr).toHaveLength(a.arrays.bias_V.length);
    // The model's gap is 0.3 eV (synthetic.ts): the average's automatic pick finds it within twice its uncertainty.
    expect(a.pick!.status).toBe("ok");
    expect(Math.abs(a.pick!.gap_eV! - 0.3)).toBeLessThanOrEqual(2 * a.pick!.uncertainty_eV! + 0.002);
    const m = await getSpectrum({ ctx: lab.ctx("collaborator"), input: { id: members[0] } });
    expect(m.averagedInto?.id).toBe(average);
  });
  it("its members leave the phase plot and the fit while the average stands for them", async () => {
    const ids = (await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } })).points.map((p) => p.spectrumId);
    expect(ids).toEqual([average]);
  });
});

describe("averaging in the session's table", () => {
  it("refuses spectra of two samples, and different bias ranges, with the reason; nothing is stored", async () => {
    const other = makeSpectrum({ ...model, seed: 44 });
    const o = await upload(otherSessionId, "other.csv", columnsToCsv(other.bias_V, [{ label: "dI/dV", didv: other.didv }], meta));
    const narrow = makeSpectrum({ ...model, seed: 45, biasMin_V: -0.3, biasMax_V: 0.3 });
    const n = await upload(sessionId, "narrow.csv", columnsToCsv(narrow.bias_V, [{ label: "dI/dV", didv: narrow.didv }], meta));
    const otherId = (await rowsOf(o.id))[0].id;
    const narrowId = (await rowsOf(n.id))[0].id;
    const before = await averagesOf(sampleId);
    await undoAverage({ ctx: lab.ctx("analyst"), input: { id: average } });
    const twoSamples = await rejection(createAverage({ ctx: lab.ctx("analyst"), input: { ids: [members[0], otherId] } }));
    expect(twoSamples.status).toBe(422);
    expect(twoSamples.message).toMatch(/Spectra of two samples cannot be averaged/);
    const ranges = await rejection(createAverage({ ctx: lab.ctx("analyst"), input: { ids: [members[0], narrowId] } }));
    expect(ranges.status).toBe(422);
    expect(ranges.message).toMatch(/different bias ranges: .* spans -500\.0 mV to 500\.0 mV, .* -300\.0 mV to 300\.0 mV/);
    expect(await averagesOf(sampleId)).toEqual(before.filter((id) => id !== average));
    expect(await db().select().from(spectrumAverageMembers).where(inArray(spectrumAverageMembers.memberId, [members[0], narrowId, otherId]))).toHaveLength(0);
  });
  it("undo brought the members back; averaging them again leaves the odd one out; putting it back uses all four", async () => {
    const phase = (await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } })).points.map((p) => p.spectrumId);
    expect(phase).toEqual(expect.arrayContaining(members));
    const made = await createAverage({ ctx: lab.ctx("microscopist"), input: { ids: members } });
    expect(made.leftOut).toEqual([members[3]]);
    const again = await rejection(createAverage({ ctx: lab.ctx("analyst"), input: { ids: members.slice(0, 2) } }));
    expect(again.message).toMatch(/is already in an average: undo that average first/);
    const back = await putBackMember({ ctx: lab.ctx("analyst"), input: { id: made.id, body: { memberId: members[3] } } });
    expect(back.leftOut).toEqual([]);
    const a = await getSpectrum({ ctx: lab.ctx("owner"), input: { id: back.id } });
    expect(a.average!.members.map((m) => [m.used, m.putBack])).toEqual([[true, false], [true, false], [true, false], [true, true]]);
    expect(await db().select().from(spectra).where(eq(spectra.id, made.id))).toHaveLength(0);
    const denied = await rejection(createAverage({ ctx: lab.ctx("collaborator"), input: { ids: members } }));
    expect(denied.status).toBe(403);
  });
});

describe("normalisation as an extraction setting", () => {
  it("a Feenstra version re-picks every spectrum on (dI/dV)/(I/V) and each pick records its view", async () => {
    await saveExtractionSettings({ ctx: lab.ctx("analyst"), input: { sampleId, settings: { normalisation: { method: "feenstra", broadening_mV: 100 } } } });
    await reanalyzeSample({ ctx: system(), input: { sampleId } });
    const picks = await db()
      .select({ auto: gapPicks.autoPick })
      .from(gapPicks)
      .innerJoin(spectra, eq(spectra.id, gapPicks.spectrumId))
      .where(eq(spectra.sampleId, sampleId));
    expect(picks.length).toBeGreaterThan(4);
    for (const p of picks) expect((p.auto as { view: { method: string } }).view.method).toBe("feenstra");
    const s = await getSpectrum({ ctx: lab.ctx("owner"), input: { id: members[0] } });
    expect(s.analysis.pickedOn).toMatchObject({ method: "feenstra", currentReconstructed: true });
    expect(s.analysis.views.feenstra.description).toMatch(/I\/V broadened by an exponential of width 100 mV/);
    expect(s.analysis.views.setpoint.description).toMatch(/I_set\/V_set = 0\.200 nS/);
    expect(s.pick!.status).toBe("ok");
  });
});
