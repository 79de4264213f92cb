import "server-only";
import { eq, sql } from "drizzle-orm";
import { invitations, labs } from "@/db/schema";
import { sha256Hex } from "@/lib/auth/secrets";
import type { SystemCtx } from "@/lib/base/context";

/** What the invitation page shows before the person accepts (no actor: the link is the credential). */
export async function describeInvitation({ ctx, input }: { ctx: SystemCtx; input: { token: string } }) {
  const [row] = await ctx.db
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, labName: labs.name, expiresAt: invitations.expiresAt, acceptedAt: invitations.acceptedAt, revokedAt: invitations.revokedAt, hasPassword: sql<boolean>`(select u.password_hash is not null from users u where u.email = ${invitations.email})` })
    .from(invitations)
    .innerJoin(labs, eq(labs.id, invitations.labId))
    .where(eq(invitations.tokenHash, sha256Hex(input.token)));
  if (!row || row.acceptedAt || row.revokedAt || row.expiresAt < new Date()) return null;
  return { email: row.email, role: row.role, labName: row.labName, existingAccount: Boolean(row.hasPassword) };
}
