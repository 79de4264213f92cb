import "server-only";
import { and, desc, eq, isNull } from "drizzle-orm";
import { crossingEvents, notifications } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { mine } from "./shared";

export async function listNotifications({ ctx, input = {} }: { ctx: Ctx; input?: { limit?: number; unreadOnly?: boolean } }) {
  assertCan(ctx.actor, "lab:read");
  const limit = Math.min(Math.max(input.limit ?? 100, 1), 500);
  const rows = await ctx.db
    .select({ n: notifications, kind: crossingEvents.kind, sampleId: crossingEvents.sampleId })
    .from(notifications)
    .leftJoin(crossingEvents, eq(crossingEvents.id, notifications.eventId))
    .where(input.unreadOnly ? and(mine(ctx), isNull(notifications.readAt)) : mine(ctx))
    .orderBy(desc(notifications.createdAt))
    .limit(limit);
  return rows.map(({ n, kind, sampleId }) => ({
    id: n.id,
    kind: kind ?? null,
    sampleId: sampleId ?? null,
    title: n.title,
    body: n.body,
    href: n.href,
    read: n.readAt != null,
    createdAt: n.createdAt.toISOString(),
  }));
}
