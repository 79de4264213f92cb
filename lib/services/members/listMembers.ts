import "server-only";
import { and, asc, desc, eq, gt, isNull } from "drizzle-orm";
import { invitations, memberships, users } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";

export async function listMembers({ ctx }: { ctx: Ctx }) {
  assertCan(ctx.actor, "lab:read");
  const members = await ctx.db
    .select({ id: memberships.id, userId: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.labId, ctx.actor.labId))
    .orderBy(asc(users.name));
  const pending =
    ctx.actor.role === "owner"
      ? await ctx.db
          .select({ id: invitations.id, email: invitations.email, role: invitations.role, expiresAt: invitations.expiresAt, createdAt: invitations.createdAt })
          .from(invitations)
          .where(and(eq(invitations.labId, ctx.actor.labId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())))
          .orderBy(desc(invitations.createdAt))
      : [];
  return { members, pending };
}
