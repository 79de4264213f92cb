import "server-only";
import { and, eq, ne, sql } from "drizzle-orm";
import { memberships } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";

export async function ownersLeft(ctx: Ctx, exceptMembershipId: string) {
  const [row] = await ctx.db
    .select({ n: sql<number>`count(*)::int` })
    .from(memberships)
    .where(and(eq(memberships.labId, ctx.actor.labId), eq(memberships.role, "owner"), ne(memberships.id, exceptMembershipId)));
  return row.n;
}
