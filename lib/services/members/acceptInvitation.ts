import "server-only";
import { eq } from "drizzle-orm";
import { invitations, memberships, users } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import { sha256Hex } from "@/lib/auth/secrets";
import { acceptInviteInput } from "@/lib/schemas/lab";
import type { SystemCtx } from "@/lib/base/context";
import { invalid } from "@/lib/base/errors";
import { parseInput } from "../parse";

/**
 * Accepts an invitation: creates the account (or, for someone who already has one, keeps its
 * password) and the membership, and marks the link used, in one transaction.
 */
export async function acceptInvitation({ ctx, input }: { ctx: SystemCtx; input: unknown }) {
  const data = parseInput(acceptInviteInput, input);
  const passwordHash = await hashPassword(data.password);
  return ctx.db.transaction(async (tx) => {
    const [invite] = await tx
      .select()
      .from(invitations)
      .where(eq(invitations.tokenHash, sha256Hex(data.token)))
      .for("update");
    if (!invite || invite.acceptedAt || invite.revokedAt || invite.expiresAt < new Date()) {
      throw invalid("This invitation link is no longer valid. Ask the lab owner for a new one.");
    }
    let [user] = await tx.select().from(users).where(eq(users.email, invite.email));
    if (!user) {
      [user] = await tx.insert(users).values({ email: invite.email, name: data.name, passwordHash }).returning();
    } else if (!user.passwordHash) {
      [user] = await tx.update(users).set({ name: data.name, passwordHash }).where(eq(users.id, user.id)).returning();
    }
    await tx.insert(memberships).values({ labId: invite.labId, userId: user.id, role: invite.role }).onConflictDoNothing();
    await tx.update(invitations).set({ acceptedAt: new Date() }).where(eq(invitations.id, invite.id));
    return { email: user.email, labId: invite.labId };
  });
}
