import "server-only";
import { eq, sql } from "drizzle-orm";
import { fieldModelVersions, type StoredFieldModel } from "@/db/schema";
import { combineKappas } from "@/lib/spectra";
import { curvesForFieldModel } from "../curves/curvesForFieldModel";
import { assertCan } from "@/lib/base/permissions";
import { fieldModelInput } from "@/lib/schemas/uploads";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";
import { getSample } from "../samples/getSample";
import { queueReanalysis } from "../runs/queueReanalysis";

/**
 * Saves a new field-model version (contact distance, decay-constant source: the work functions' mean,
 * a barrier typed in, or the sample's I(z) curves, screening) and re-estimates every field.
 */
export async function saveFieldModel({ ctx, input }: { ctx: Ctx; input: { sampleId: string; model: unknown } }) {
  assertCan(ctx.actor, "analysis:write");
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const m = parseInput(fieldModelInput, input.model);
  // κ from I(z) curves: the version records which curves and their weighted κ, and the barrier
  // height with its σ that the distance and field uncertainties then propagate.
  const curves =
    m.decayConstantSource === "curves"
      ? await curvesForFieldModel({
          ctx,
          input: { sampleId: sample.id, scope: m.curveScope!, sessionId: m.curveSessionId, tipId: m.curveTipId, curveIds: m.curveIds },
        })
      : null;
  const fromCurves = curves && combineKappas([curves]);
  const stored = {
    contactDistance_nm: m.contactDistance_nm,
    contactDistanceSigma_nm: m.contactDistanceSigma_nm,
    decayConstantSource: m.decayConstantSource,
    barrierHeight_eV: fromCurves ? fromCurves.barrierHeight_eV : m.decayConstantSource === "measured" ? (m.barrierHeight_eV ?? null) : null,
    barrierHeightSigma_eV: fromCurves ? fromCurves.barrierHeightSigma_eV : 0,
    assumedBarrierSigma_eV: m.assumedBarrierSigma_eV,
    curves,
    screening: m.screening,
  } satisfies StoredFieldModel;
  const version = await ctx.db.transaction(async (tx) => {
    const [{ next }] = await tx.select({ next: sql<number>`coalesce(max(${fieldModelVersions.version}), 0) + 1` }).from(fieldModelVersions).where(eq(fieldModelVersions.sampleId, sample.id));
    const [row] = await tx.insert(fieldModelVersions).values({ labId: ctx.actor.labId, sampleId: sample.id, version: next, model: stored, note: m.note ?? null, createdBy: ctx.actor.userId }).returning();
    return row;
  });
  await recordAudit(ctx, "settings.field-model", { type: "sample", id: sample.id }, { version: version.version });
  const run = await queueReanalysis({ ctx, input: { sampleId: sample.id, reason: `field model v${version.version}` } });
  return { id: version.id, version: version.version, model: stored, runId: run.id, createdAt: version.createdAt.toISOString() };
}
