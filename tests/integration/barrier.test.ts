import type { ChildProcess } from "node:child_process";
import { eq } from "drizzle-orm";
import { strToU8, zipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { analysisRuns, approachCurves, fieldModelVersions } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { saveFieldModel } from "@/lib/services/analysis/saveFieldModel";
import { getSessionBarrier } from "@/lib/services/curves/getSessionBarrier";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { getPhase } from "@/lib/services/spectra/getPhase";
import { createTip } from "@/lib/services/tips/createTip";
import {
  approachToCsv,
  decayConstant_per_nm,
  makeApproachCurve,
  makeRng,
  makeSweep,
  spectrumToCsv,
} from "@/lib/spectra";
import { makeLab, rejection, type LabFixture } from "../support/fixtures";
import { startWorkerProcess, stopWorkerProcess, uploadFile, waitForUploads } from "../support/pipeline";

/**
 * I(z) curves through the pipeline: a folder of spectra and I(z) curves pushed as one zip, the
 * curves stored with their fit, listed by the session's barrier endpoint's service, and a field
 * model taking κ from them, re-estimated in the background. The sweep and the curves come from the
 * project's physical models (synthetic.ts, barrier/model.ts): tip 4.7 eV, sample 3.9 eV, so the
 * work-function assumption gives φ̄ = 4.3 eV, κ = √(2m_eφ̄)/ħ = 10.62 nm⁻¹; the curves are made with
 * that κ, so the fields stay where they were and only their uncertainty changes.
 */
process.env.JOB_EXPIRE_SECONDS = "4";

let lab: LabFixture;
let other: LabFixture;
let sessionId: string;
let emptySessionId: string;
let sampleId: string;
let worker: ChildProcess | undefined;
const kappa = decayConstant_per_nm(4.3);
const sweep = makeSweep({ n: 14, seed: 41 });

async function waitForRun(runId: string) {
  const deadline = Date.now() + 30_000;
  for (;;) {
    const [run] = await db().select().from(analysisRuns).where(eq(analysisRuns.id, runId));
    if (run.status === "done") return;
    if (run.status === "failed" || Date.now() > deadline) throw new Error(`re-analysis ${run.status}: ${run.message}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

beforeAll(async () => {
  lab = await makeLab("Barrier");
  other = await makeLab("Barrier other");
  const owner = lab.ctx("owner");
  sampleId = (
    await createSample({
      ctx: owner,
      input: { name: "GX κ", material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 },
    })
  ).id;
  const tip = await createTip({
    ctx: owner,
    input: { label: "W-9", material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: 0.1 },
  });
  sessionId = (
    await createSession({
      ctx: owner,
      input: { sampleId, tipId: tip.id, label: "sweep", date: "2026-11-20", temperature_K: 4.5 },
    })
  ).id;
  emptySessionId = (
    await createSession({ ctx: owner, input: { sampleId, tipId: tip.id, label: "no curves", date: "2026-11-21" } })
  ).id;
  worker = await startWorkerProcess();
}, 60_000);

afterAll(async () => {
  await stopWorkerProcess(worker);
  await stopBoss();
  await closeDb();
});

describe("I(z) curves pushed with the spectra", () => {
  it("one zip of spectra and I(z) curves: both stored, each curve with its fit or its message", async () => {
    const entries: Record<string, Uint8Array> = {};
    sweep.spectra.forEach((s, i) => (entries[`sts/s${String(i).padStart(2, "0")}.csv`] = strToU8(spectrumToCsv(s))));
    const meta = { setpoint_bias_V: 0.1, setpoint_current_A: 1e-10 };
    for (const seed of [1, 2, 3])
      entries[`iz/curve-${seed}.csv`] = strToU8(
        approachToCsv({ ...makeApproachCurve({ kappa_per_nm: kappa, seed, relNoise: 0.01, retraction: true }), meta }),
      );
    const rng = makeRng(4);
    const z = Float64Array.from({ length: 80 }, (_, i) => 0.2 - i * 0.005);
    entries["iz/flat.csv"] = strToU8(
      approachToCsv({ z_nm: z, current_A: z.map(() => 1e-10 * (1 + 0.02 * rng.normal())), meta }),
    );
    const { id } = await uploadFile(lab.ctx("microscopist"), sessionId, "run.zip", zipSync(entries));
    const [u] = await waitForUploads([id]);
    expect(u.status).toBe("done");
    expect(u.spectraCount).toBe(14);
    expect(u.curvesCount).toBe(4);
    expect(u.warnings.join("\n")).toMatch(/flat\.csv \(current\): no κ: the current does not decay/);
  });

  it("the session's barrier lists κ, σκ and φ_ap per curve, the bad one with its message, and their weighted κ", async () => {
    const b = await getSessionBarrier({ ctx: lab.ctx("collaborator"), input: { sessionId } });
    expect(b.curves).toHaveLength(4);
    const ok = b.curves.filter((c) => c.status === "ok");
    expect(ok).toHaveLength(3);
    for (const c of ok) {
      expect(Math.abs(c.kappa_per_nm! - kappa)).toBeLessThan(3 * c.kappaSigma_per_nm!);
      expect(c.sweeps.map((s) => s.direction)).toEqual(["approach", "retraction"]);
    }
    expect(b.curves.find((c) => c.status === "error")!.message).toMatch(/does not decay/);
    expect(Math.abs(b.summary!.kappa_per_nm - kappa)).toBeLessThan(3 * b.summary!.kappaSigma_per_nm);
    // φ_ap = ħ²κ²/(2m_e) gives back the 4.3 eV the curves were made with.
    expect(Math.abs(b.summary!.barrierHeight_eV - 4.3)).toBeLessThan(3 * b.summary!.barrierHeightSigma_eV);
    const withData = await getSessionBarrier({ ctx: lab.ctx("analyst"), input: { sessionId, withData: true } });
    expect(withData.curves[0].z_nm).toHaveLength(400);
    expect(withData.curves[0].pointStatus).toHaveLength(400);
  });

  it("a field model with κ from the session's curves records them, re-estimates, and the card's source says so", async () => {
    const before = await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } });
    const saved = await saveFieldModel({
      ctx: lab.ctx("analyst"),
      input: {
        sampleId,
        model: {
          contactDistance_nm: 0.25,
          decayConstantSource: "curves",
          curveScope: "session",
          curveSessionId: sessionId,
        },
      },
    });
    await waitForRun(saved.runId);
    const [v] = await db().select().from(fieldModelVersions).where(eq(fieldModelVersions.id, saved.id));
    const m = v.model as {
      curves: { curveIds: string[]; scope: string };
      barrierHeight_eV: number;
      barrierHeightSigma_eV: number;
    };
    const okIds = (await db().select().from(approachCurves).where(eq(approachCurves.sessionId, sessionId)))
      .filter((c) => c.fitStatus === "ok")
      .map((c) => c.id);
    expect([...m.curves.curveIds].sort()).toEqual([...okIds].sort());
    expect(m.curves.scope).toBe("session");
    expect(m.barrierHeightSigma_eV).toBeGreaterThan(0);
    const after = await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } });
    expect(after.crossing.fieldModelVersionId).toBe(saved.id);
    expect("kappaSource" in after.crossing && after.crossing.kappaSource).toMatch(
      /^κ = 10\.6\d ± 0\.\d\d nm⁻¹ measured on 3 I\(z\) curves of the session of 2026-11-20 \(W-9\)/,
    );
    // Same κ as the assumption: the fields stay within 0.5%.
    const byId = new Map(before.points.map((p) => [p.spectrumId, p]));
    for (const p of after.points)
      expect(Math.abs(p.field_V_per_nm / byId.get(p.spectrumId)!.field_V_per_nm - 1)).toBeLessThan(0.005);
    // … while the measured κ (±0.1%) replaces the mean-work-function assumption (±1 eV of 4.3, the new
    // sample's default): every field's model σ shrinks.
    for (const p of after.points)
      expect(p.fieldSigma_V_per_nm!).toBeLessThan(byId.get(p.spectrumId)!.fieldSigma_V_per_nm! * 0.99);
  });

  it("a choice without fitted curves is a field error; another lab sees nothing", async () => {
    const err = await rejection(
      saveFieldModel({
        ctx: lab.ctx("analyst"),
        input: {
          sampleId,
          model: {
            contactDistance_nm: 0.25,
            decayConstantSource: "curves",
            curveScope: "session",
            curveSessionId: emptySessionId,
          },
        },
      }),
    );
    expect(err.status).toBe(422);
    expect((err as { fieldErrors?: unknown }).fieldErrors).toEqual({
      curveSessionId: ["No I(z) curves of this sample match that choice."],
    });
    expect((await rejection(getSessionBarrier({ ctx: other.ctx("owner"), input: { sessionId } }))).status).toBe(404);
  });
});
