import "server-only";
import { and, eq, inArray, type SQL } from "drizzle-orm";
import { sampleAccess, samples } from "@/db/schema";
import { notFound } from "@/lib/base/errors";
import type { Ctx } from "@/lib/base/context";

/**
 * Which samples the actor may see. Members see all of their lab's samples; a collaborator with
 * chosen samples (rows in sample_access) sees only those.
 */
export async function sampleVisibility(ctx: Ctx): Promise<SQL> {
  const inLab = eq(samples.labId, ctx.actor.labId);
  if (ctx.actor.role !== "collaborator") return inLab;
  const granted = await ctx.db
    .select({ sampleId: sampleAccess.sampleId })
    .from(sampleAccess)
    .where(and(eq(sampleAccess.labId, ctx.actor.labId), eq(sampleAccess.userId, ctx.actor.userId)));
  if (granted.length === 0) return inLab;
  return and(inLab, inArray(samples.id, granted.map((g) => g.sampleId)))!;
}

/**
 * A child record (upload, spectrum, session) is visible only if its sample is: a collaborator
 * limited to other samples gets "not found" for it, named after the child.
 */
export async function assertSampleVisible(ctx: Ctx, sampleId: string, what: string): Promise<void> {
  const [row] = await ctx.db.select({ id: samples.id }).from(samples).where(and(eq(samples.id, sampleId), await sampleVisibility(ctx)));
  if (!row) throw notFound(what);
}
