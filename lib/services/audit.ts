import "server-only";
import { auditEvents } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";

/** Appends one audit event in the caller's transaction. */
export async function recordAudit(
  ctx: Ctx,
  action: string,
  target: { type: string; id?: string | null },
  data: Record<string, unknown> = {},
): Promise<void> {
  await ctx.db.insert(auditEvents).values({
    labId: ctx.actor.labId,
    actorId: ctx.actor.userId,
    via: ctx.actor.via,
    action,
    targetType: target.type,
    targetId: target.id ?? null,
    data,
  });
}
