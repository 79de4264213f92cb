import "server-only";
import { and, desc, eq } from "drizzle-orm";
import { analysisRuns, extractionSettingsVersions, fieldModelVersions } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { getSample } from "../samples/getSample";
import { curveChoicesOf } from "../curves/shared";

export async function getSampleVersions({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }) {
  assertCan(ctx.actor, "lab:read");
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const [settings] = await ctx.db.select().from(extractionSettingsVersions).where(eq(extractionSettingsVersions.sampleId, sample.id)).orderBy(desc(extractionSettingsVersions.version)).limit(1);
  const [field] = await ctx.db.select().from(fieldModelVersions).where(eq(fieldModelVersions.sampleId, sample.id)).orderBy(desc(fieldModelVersions.version)).limit(1);
  const [run] = await ctx.db.select().from(analysisRuns).where(and(eq(analysisRuns.sampleId, sample.id))).orderBy(desc(analysisRuns.createdAt)).limit(1);
  // Sessions and tips of this sample with fitted I(z) curves, and the curves themselves: where a
  // field model may take κ from.
  const { choices: curveChoices, curves: fittedCurves } = await curveChoicesOf(ctx.db, ctx.actor.labId, sample.id);
  return { settings, field, run: run ?? null, curveChoices, fittedCurves };
}
