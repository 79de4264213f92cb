import "server-only";
import { and, isNull, sql } from "drizzle-orm";
import { notifications } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";
import { mine } from "./shared";

/** For the badge in the lab navigation. */
export async function unreadCount({ ctx }: { ctx: Ctx }): Promise<number> {
  const [{ n }] = await ctx.db.select({ n: sql<number>`count(*)::int` }).from(notifications).where(and(mine(ctx), isNull(notifications.readAt)));
  return n;
}
