import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { spectra } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { setSampleAccess } from "@/lib/services/members/setSampleAccess";
import { pickHistoryOf } from "@/lib/services/picks/pickHistoryOf";
import { createSample } from "@/lib/services/samples/createSample";
import { getSample } from "@/lib/services/samples/getSample";
import { listSamples } from "@/lib/services/samples/listSamples";
import { createSession } from "@/lib/services/sessions/createSession";
import { listSessions } from "@/lib/services/sessions/listSessions";
import { getPhase } from "@/lib/services/spectra/getPhase";
import { getSpectrum } from "@/lib/services/spectra/getSpectrum";
import { listSessionSpectra } from "@/lib/services/spectra/listSessionSpectra";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { getUpload } from "@/lib/services/uploads/getUpload";
import { makeSweep, spectrumToCsv } from "@/lib/spectra";
import { makeLab, rejection, type LabFixture, system } from "../support/fixtures";
import { bytesOf, uploadFile } from "../support/pipeline";

/** An owner can limit a collaborator to chosen samples; everything about the other samples is then "not found" for them. */
let f: LabFixture;
const open: Record<string, string> = {};
const hidden: Record<string, string> = {};

beforeAll(async () => {
  f = await makeLab("Access");
  const owner = f.ctx("owner");
  for (const [target, name] of [[open, "Shared film"], [hidden, "Unpublished film"]] as const) {
    target.sample = (await createSample({ ctx: owner, input: { name, material: "stanene", workFunction_eV: 4.3, workFunctionSigma_eV: 0.1 } })).id;
    target.session = (await createSession({ ctx: owner, input: { sampleId: target.sample, label: `${name} session`, date: "2026-11-24" } })).id;
    const { id } = await uploadFile(owner, target.session, `${name}.csv`, bytesOf(spectrumToCsv(makeSweep({ n: 1, seed: name.length }).spectra[0])));
    await processUpload({ ctx: system(), input: { uploadId: id } });
    target.upload = id;
    target.spectrum = (await db().select({ id: spectra.id }).from(spectra).where(eq(spectra.uploadId, id)))[0].id;
  }
  await setSampleAccess({ ctx: owner, input: { userId: f.people.collaborator.id, sampleIds: [open.sample] } });
});
afterAll(async () => {
  await stopBoss();
  await closeDb();
});

describe("a collaborator limited to one sample", () => {
  it("sees only that sample in lists", async () => {
    const c = f.ctx("collaborator");
    expect((await listSamples({ ctx: c })).map((s) => s.id)).toEqual([open.sample]);
    expect((await listSessions({ ctx: c })).map((s) => s.id)).toEqual([open.session]);
    // Other roles still see both.
    expect(await listSamples({ ctx: f.ctx("analyst") })).toHaveLength(2);
  });

  it("gets 404 for everything of the other sample", async () => {
    const c = f.ctx("collaborator");
    const attempts = [
      () => getSample({ ctx: c, input: { id: hidden.sample } }),
      () => getPhase({ ctx: c, input: { sampleId: hidden.sample } }),
      () => getSpectrum({ ctx: c, input: { id: hidden.spectrum } }),
      () => getUpload({ ctx: c, input: { id: hidden.upload } }),
      () => pickHistoryOf({ ctx: c, input: { spectrumId: hidden.spectrum } }),
      () => listSessionSpectra({ ctx: c, input: { sessionId: hidden.session, query: { page: 1, pageSize: 10, sort: "index", dir: "asc" } } }),
    ];
    for (const a of attempts) expect((await rejection(a())).status).toBe(404);
    expect((await getSpectrum({ ctx: c, input: { id: open.spectrum } })).id).toBe(open.spectrum);
  });

  it("only owners set access, and only collaborators can be limited", async () => {
    expect((await rejection(setSampleAccess({ ctx: f.ctx("analyst"), input: { userId: f.people.collaborator.id, sampleIds: [] } }))).status).toBe(403);
    expect((await rejection(setSampleAccess({ ctx: f.ctx("owner"), input: { userId: f.people.analyst.id, sampleIds: [open.sample] } }))).status).toBe(422);
    await setSampleAccess({ ctx: f.ctx("owner"), input: { userId: f.people.collaborator.id, sampleIds: [] } });
    expect(await listSamples({ ctx: f.ctx("collaborator") })).toHaveLength(2);
  });
});
