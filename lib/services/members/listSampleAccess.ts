import "server-only";
import { eq } from "drizzle-orm";
import { sampleAccess } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";

/** Which samples each collaborator is limited to (none listed: they see every sample of the lab). */
export async function listSampleAccess({ ctx }: { ctx: Ctx }) {
  assertCan(ctx.actor, "members:manage");
  const rows = await ctx.db.select({ userId: sampleAccess.userId, sampleId: sampleAccess.sampleId }).from(sampleAccess).where(eq(sampleAccess.labId, ctx.actor.labId));
  const out: Record<string, string[]> = {};
  for (const r of rows) (out[r.userId] ??= []).push(r.sampleId);
  return out;
}
