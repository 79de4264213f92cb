import "server-only";
import { and, eq, inArray } from "drizzle-orm";
import { memberships, sampleAccess, samples } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { invalid, notFound } from "@/lib/base/errors";

/**
 * An owner limits a collaborator to chosen samples (an empty list gives back access to all).
 * Only collaborators can be limited: the other roles work on the whole lab.
 */
export async function setSampleAccess({ ctx, input }: { ctx: Ctx; input: { userId: string; sampleIds: string[] } }) {
  assertCan(ctx.actor, "members:manage");
  const [m] = await ctx.db.select().from(memberships).where(and(eq(memberships.labId, ctx.actor.labId), eq(memberships.userId, input.userId)));
  if (!m) throw notFound("member");
  if (m.role !== "collaborator") throw invalid("Only collaborators can be limited to chosen samples.");
  const ids = [...new Set(input.sampleIds)];
  if (ids.length) {
    const found = await ctx.db.select({ id: samples.id }).from(samples).where(and(eq(samples.labId, ctx.actor.labId), inArray(samples.id, ids)));
    if (found.length !== ids.length) throw notFound("sample");
  }
  await ctx.db.transaction(async (tx) => {
    await tx.delete(sampleAccess).where(and(eq(sampleAccess.labId, ctx.actor.labId), eq(sampleAccess.userId, input.userId)));
    if (ids.length) await tx.insert(sampleAccess).values(ids.map((sampleId) => ({ labId: ctx.actor.labId, sampleId, userId: input.userId })));
  });
  await recordAudit(ctx, "member.sample-access", { type: "membership", id: m.id }, { samples: ids.length });
  return { userId: input.userId, sampleIds: ids };
}
