import "server-only";
import { and, inArray, isNull } from "drizzle-orm";
import { z } from "zod";
import { notifications } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";
import { mine } from "./shared";

export const markReadInput = z.union([z.object({ all: z.literal(true) }), z.object({ ids: z.array(z.string().uuid()).min(1).max(500) })]);

/** Marks some (or all) of the actor's notifications read; returns how many changed. */
export async function markNotificationsRead({ ctx, input }: { ctx: Ctx; input: unknown }): Promise<{ updated: number }> {
  assertCan(ctx.actor, "lab:read");
  const data = parseInput(markReadInput, input);
  const where = "all" in data ? and(mine(ctx), isNull(notifications.readAt)) : and(mine(ctx), isNull(notifications.readAt), inArray(notifications.id, data.ids));
  const rows = await ctx.db.update(notifications).set({ readAt: new Date() }).where(where).returning({ id: notifications.id });
  return { updated: rows.length };
}
