import "server-only";
import { and, eq, inArray } from "drizzle-orm";
import { memberships, subscriptions, type MemberRole } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";

/** The lab's default: these roles watch every new sample (each can stop with the watch toggle). */
export const DEFAULT_WATCHER_ROLES: readonly MemberRole[] = ["owner", "analyst"];

/** Subscribes the lab's owners and analysts to a sample just created (called by createSample). */
export async function subscribeLabDefaults({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }): Promise<number> {
  const { sampleId } = input;
  const members = await ctx.db
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(and(eq(memberships.labId, ctx.actor.labId), inArray(memberships.role, [...DEFAULT_WATCHER_ROLES])));
  if (!members.length) return 0;
  const rows = await ctx.db
    .insert(subscriptions)
    .values(members.map((m) => ({ labId: ctx.actor.labId, sampleId, userId: m.userId })))
    .onConflictDoNothing()
    .returning({ id: subscriptions.id });
  return rows.length;
}
