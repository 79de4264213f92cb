import { eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { gapPicks, spectra } from "@/db/schema";
import { reanalyzeSample } from "@/lib/services/analysis/reanalyzeSample";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { columnsToCsv, makeRepeats, type QualityFlag } from "@/lib/spectra";
import { makeLab, type LabFixture, system } from "../support/fixtures";
import { bytesOf, uploadFile } from "../support/pipeline";

/**
 * Repeats at one point in one file (four dI/dV columns sharing a position and a setpoint, from the
 * physical model's makeRepeats) are compared when the file is processed and again after a
 * re-analysis: a tip change between the second and third repeat flags all four; repeats that differ
 * by noise only flag none.
 */
let lab: LabFixture;
let sampleId: string;
let sessionId: string;
const model = { vbEdge_V: -0.12, cbEdge_V: 0.18, T_K: 4.5, vrms_mV: 2, noise: 0.03, seed: 41 };

async function upload(name: string, reps: ReturnType<typeof makeRepeats>) {
  const csv = columnsToCsv(
    reps[0].bias_V,
    reps.map((r, k) => ({ label: `dI/dV repeat ${k + 1}`, didv: r.didv })),
    { setpoint_bias_V: 0.5, setpoint_current_A: 1e-10, temperature_K: 4.5, lockin_modulation_mV_rms: 2, x_nm: 12.5, y_nm: 3 },
  );
  const { id } = await uploadFile(lab.ctx("owner"), sessionId, name, bytesOf(csv));
  await processUpload({ ctx: system(), input: { uploadId: id } });
  return (await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.uploadId, id)).orderBy(spectra.indexInFile)).map((r) => r.id);
}
const flagsOf = async (ids: string[]) => {
  const rows = await db().select({ spectrumId: gapPicks.spectrumId, flags: gapPicks.flags }).from(gapPicks).where(inArray(gapPicks.spectrumId, ids));
  return ids.map((id) => (rows.find((r) => r.spectrumId === id)!.flags as QualityFlag[]).map((f) => f.code));
};

let changed: string[];
let steady: string[];
beforeAll(async () => {
  lab = await makeLab("Repeats");
  const owner = lab.ctx("owner");
  sampleId = (await createSample({ ctx: owner, input: { name: "Repeats", material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } })).id;
  sessionId = (await createSession({ ctx: owner, input: { sampleId, label: "repeats", date: "2026-12-04", temperature_K: 4.5 } })).id;
  changed = await upload("changed.csv", makeRepeats(model, 4, { after: 2, edgeShift_V: 0.03, amplitudeFactor: 1.3 }));
  steady = await upload("steady.csv", makeRepeats({ ...model, seed: 42 }, 4));
}, 60_000);

afterAll(async () => {
  await closeDb();
});

describe("repeats at one point", () => {
  it("a tip change between repeats flags every repeat of the file; repeats that agree flag none", async () => {
    expect(changed).toHaveLength(4);
    expect((await flagsOf(changed)).every((c) => c.includes("tip-change"))).toBe(true);
    expect((await flagsOf(steady)).every((c) => !c.includes("tip-change") && !c.includes("drift"))).toBe(true);
  });
  it("a re-analysis compares the repeats again and keeps the flags", async () => {
    await reanalyzeSample({ ctx: system(), input: { sampleId } });
    expect((await flagsOf(changed)).every((c) => c.includes("tip-change"))).toBe(true);
    expect((await flagsOf(steady)).every((c) => !c.includes("tip-change"))).toBe(true);
  });
});
