import "server-only";
import { eq, sql } from "drizzle-orm";
import { fieldModelVersions } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { fieldModelInput } from "@/lib/schemas/uploads";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";
import { getSample } from "../samples/getSample";
import { queueReanalysis } from "../runs/queueReanalysis";

/** Saves a new field-model version (contact distance, decay-constant source, screening) and re-estimates every field. */
export async function saveFieldModel({ ctx, input }: { ctx: Ctx; input: { sampleId: string; model: unknown } }) {
  assertCan(ctx.actor, "analysis:write");
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const m = parseInput(fieldModelInput, input.model);
  const stored = {
    contactDistance_nm: m.contactDistance_nm,
    contactDistanceSigma_nm: m.contactDistanceSigma_nm,
    decayConstantSource: m.decayConstantSource,
    barrierHeight_eV: m.decayConstantSource === "measured" ? (m.barrierHeight_eV ?? null) : null,
    screening: m.screening,
  };
  const version = await ctx.db.transaction(async (tx) => {
    const [{ next }] = await tx.select({ next: sql<number>`coalesce(max(${fieldModelVersions.version}), 0) + 1` }).from(fieldModelVersions).where(eq(fieldModelVersions.sampleId, sample.id));
    const [row] = await tx.insert(fieldModelVersions).values({ labId: ctx.actor.labId, sampleId: sample.id, version: next, model: stored, note: m.note ?? null, createdBy: ctx.actor.userId }).returning();
    return row;
  });
  await recordAudit(ctx, "settings.field-model", { type: "sample", id: sample.id }, { version: version.version });
  const run = await queueReanalysis({ ctx, input: { sampleId: sample.id, reason: `field model v${version.version}` } });
  return { id: version.id, version: version.version, model: stored, runId: run.id, createdAt: version.createdAt.toISOString() };
}
