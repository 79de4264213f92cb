import "server-only";
import { and, eq, ne, sql } from "drizzle-orm";
import { addDays } from "date-fns";
import type { DbOrTx } from "@/db/client";
import { invitations, memberships, type MemberRole } from "@/db/schema";
import { newSecret, sha256Hex } from "@/lib/auth/secrets";
import type { Ctx } from "@/lib/base/context";
import { env } from "@/lib/env";

export const INVITE_DAYS = 7;

/** An invitation and its link: the secret goes only into the link, the database keeps its hash. */
export async function insertInvitation(
  db: DbOrTx,
  v: { labId: string; email: string; role: MemberRole; invitedBy: string | null },
) {
  const secret = newSecret("bxi", 24);
  const [invite] = await db
    .insert(invitations)
    .values({ ...v, tokenHash: sha256Hex(secret), expiresAt: addDays(new Date(), INVITE_DAYS) })
    .returning();
  return { invite, link: `${env().APP_URL}/invite/${secret}` };
}

export async function ownersLeft(ctx: Ctx, exceptMembershipId: string) {
  const [row] = await ctx.db
    .select({ n: sql<number>`count(*)::int` })
    .from(memberships)
    .where(and(eq(memberships.labId, ctx.actor.labId), eq(memberships.role, "owner"), ne(memberships.id, exceptMembershipId)));
  return row.n;
}
