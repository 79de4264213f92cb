import "server-only";
import { createHash } from "node:crypto";
import { and, eq } from "drizzle-orm";
import type { SystemCtx } from "@/lib/base/context";
import { labs, measurementSessions, memberships, samples, tips, users } from "@/db/schema";
import { actorForUser } from "@/lib/auth/actor";
import { approachToCsv, columnsToCsv, decayConstant_per_nm, makeApproachCurve, makeSpectrum, makeSweep, spectrumToCsv, type ApproachModel } from "@/lib/spectra";
import { createSession } from "../sessions/createSession";
import { createUploads } from "../uploads/createUploads";
import { completeUpload } from "../uploads/completeUpload";

/**
 * Spectra for the invented demo lab, from the project's physical model (lib/spectra/synthetic.ts):
 * an approach series on the bilayer whose gap closes near 0.98 V/nm and reopens; on the monolayer a
 * series that only closes; on a third film a 12 × 12 grid at one setpoint whose gap dips near a step; I(z) curves
 * with the bilayer's and the monolayer's tips (barrier/model.ts). They go through the
 * real upload path (storage, queue, worker), so a fresh `npm start` shows a working notebook.
 */
export async function seedDemoSpectra({ ctx: system, input }: { ctx: SystemCtx; input: { labSlug: string } }): Promise<number> {
  const { db } = system;
  const { labSlug } = input;
  const [owner] = await db
    .select({ id: users.id })
    .from(memberships)
    .innerJoin(labs, eq(labs.id, memberships.labId))
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(labs.slug, labSlug), eq(memberships.role, "microscopist")));
  const ctx = { db, actor: await actorForUser(db, owner.id, labSlug) };
  const [bilayer] = await db.select().from(samples).where(and(eq(samples.labId, ctx.actor.labId), eq(samples.name, "GX-12 bilayer")));
  const [mono] = await db.select().from(samples).where(and(eq(samples.labId, ctx.actor.labId), eq(samples.name, "SN-03 monolayer")));
  const [edge] = await db.select().from(samples).where(and(eq(samples.labId, ctx.actor.labId), eq(samples.name, "SN-05 step edge")));
  const [session] = await db.select().from(measurementSessions).where(eq(measurementSessions.sampleId, bilayer.id));
  const [pt] = await db.select().from(tips).where(and(eq(tips.labId, ctx.actor.labId), eq(tips.label, "PtIr-04")));

  const files: { sessionId: string; name: string; text: string }[] = [];
  const sweep = makeSweep({ n: 24, seed: 2026, fieldModel: { tipWorkFunction_eV: 4.7, sampleWorkFunction_eV: 3.9 }, noise: 0.03 });
  sweep.spectra.forEach((s, i) => files.push({ sessionId: session.id, name: `gx12-approach-${String(i + 1).padStart(2, "0")}.csv`, text: spectrumToCsv({ ...s, meta: { ...s.meta, region: i % 3 === 0 ? "terrace B" : "terrace A" } }) }));

  const monoSession = await createSession({ ctx, input: { sampleId: mono.id, tipId: pt?.id, label: "SN-03 approach", date: "2026-11-26", instrument: "LT-STM bay 1", temperature_K: 1.3 } });
  const mapSession = await createSession({ ctx, input: { sampleId: edge.id, tipId: pt?.id, label: "SN-05 grid across the step", date: "2026-11-27", instrument: "LT-STM bay 1", temperature_K: 1.3 } });
  // PtIr tip (5.4 eV) on stanene (4.3 eV): the gap shrinks but does not reach zero in range.
  const closing = makeSweep({ n: 12, seed: 77, fieldModel: { tipWorkFunction_eV: 5.4, sampleWorkFunction_eV: 4.3 }, criticalField_V_per_nm: 2.4, slope_eV_per_V_per_nm: 0.12, T_K: 1.3, vrms_mV: 1.5 });
  closing.spectra.forEach((s, i) => files.push({ sessionId: monoSession.id, name: `sn03-approach-${String(i + 1).padStart(2, "0")}.csv`, text: spectrumToCsv(s) }));
  const nx = 12;
  const cols = [];
  let bias: Float64Array | null = null;
  for (let k = 0; k < nx * nx; k++) {
    const x = (k % nx) * 0.5;
    const y = Math.floor(k / nx) * 0.5;
    const dip = Math.exp(-((x - 4) ** 2 + (y - 2.5) ** 2) / 2);
    const gap = 0.16 - 0.09 * dip;
    const s = makeSpectrum({ vbEdge_V: -gap / 2 + 0.01, cbEdge_V: gap / 2 + 0.01, T_K: 1.3, vrms_mV: 1.5, noise: 0.03, seed: 500 + k, step_V: 0.004 });
    bias ??= s.bias_V;
    cols.push({ label: `px${k}`, didv: s.didv });
  }
  files.push({ sessionId: mapSession.id, name: "sn05-grid-12x12.csv", text: columnsToCsv(bias!, cols, { setpoint_bias_V: 0.6, setpoint_current_A: 2e-10, temperature_K: 1.3, lockin_modulation_mV_rms: 1.5, extra: { grid: `${nx} x ${nx}`, grid_step_nm: "0.5" } }) });

  // I(z) curves at the sessions' setpoints, forth and back, with the tips used there: W-17 on the
  // bilayer (φ̄ = (4.7 + 3.9)/2 = 4.3 eV, the barrier the sweep above was made with), one jumping to
  // point contact and one reaching the preamplifier's 10 nA; PtIr-04 on the monolayer (4.85 eV).
  const izMeta = (T: number) => ({ setpoint_bias_V: 0.1, setpoint_current_A: 1e-10, temperature_K: T });
  const gxCurves: ApproachModel[] = [
    { kappa_per_nm: decayConstant_per_nm(4.3), seed: 11 },
    { kappa_per_nm: decayConstant_per_nm(4.3), seed: 12, contact: { at_nm: -0.24, conductance_G0: 0.6 }, zTo_nm: -0.3 },
    { kappa_per_nm: decayConstant_per_nm(4.3), seed: 13, saturation_A: 1e-8, zTo_nm: -0.32 },
    { kappa_per_nm: decayConstant_per_nm(4.3), seed: 14, retractionScale: 1.01 },
  ];
  gxCurves.forEach((m, i) => {
    const c = makeApproachCurve({ relNoise: 0.02, floor_A: 0.8e-12, zFrom_nm: 0.35, n: 160, retraction: true, ...m });
    files.push({ sessionId: session.id, name: `gx12-iz-${i + 1}.csv`, text: approachToCsv({ ...c, meta: izMeta(4.6) }) });
  });
  for (const seed of [21, 22]) {
    const c = makeApproachCurve({ kappa_per_nm: decayConstant_per_nm(4.85), seed, relNoise: 0.03, floor_A: 0.5e-12, zFrom_nm: 0.3, n: 140, retraction: true });
    files.push({ sessionId: monoSession.id, name: `sn03-iz-${seed - 20}.csv`, text: approachToCsv({ ...c, meta: izMeta(1.3) }) });
  }

  for (const f of files) {
    const bytes = new TextEncoder().encode(f.text);
    const sha256 = createHash("sha256").update(bytes).digest("hex");
    const { uploads: [t] } = await createUploads({ ctx, input: { sessionId: f.sessionId, files: [{ name: f.name, size: bytes.length, sha256 }] } });
    if (t.duplicate) continue;
    const res = await fetch(t.url!, { method: "PUT", headers: t.headers, body: Buffer.from(bytes) });
    if (!res.ok) throw new Error(`demo upload of ${f.name} failed: storage answered ${res.status}`);
    await completeUpload({ ctx, input: { id: t.id } });
  }
  return files.length;
}
