import "server-only";
import { and, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { z } from "zod";
import { crossingEvents, notifications } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";

/*
 * The actor's in-app notifications in the current lab: one row per person per event, written when
 * the event is recorded (lib/services/alerts/recordEvent.ts). Nobody reads or marks another
 * person's rows: every query is scoped to the actor's user id and lab.
 */

const mine = (ctx: Ctx) => and(eq(notifications.userId, ctx.actor.userId), eq(notifications.labId, ctx.actor.labId));

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

/** For the badge in the lab navigation. */
export async function unreadCount({ ctx }: { ctx: Ctx }): Promise<number> {
  const [{ n }] = await ctx.db.select({ n: sql<number>`count(*)::int` }).from(notifications).where(and(mine(ctx), isNull(notifications.readAt)));
  return n;
}

export const markReadInput = z.union([z.object({ all: z.literal(true) }), z.object({ ids: z.array(z.string().uuid()).min(1).max(500) })]);

/** Marks some (or all) of the actor's notifications read; returns how many changed. */
export async function markNotificationsRead({ ctx, input }: { ctx: Ctx; input: unknown }): Promise<{ updated: number }> {
  assertCan(ctx.actor, "lab:read");
  const data = parseInput(markReadInput, input);
  const where = "all" in data ? and(mine(ctx), isNull(notifications.readAt)) : and(mine(ctx), isNull(notifications.readAt), inArray(notifications.id, data.ids));
  const rows = await ctx.db.update(notifications).set({ readAt: new Date() }).where(where).returning({ id: notifications.id });
  return { updated: rows.length };
}
