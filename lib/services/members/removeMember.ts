import "server-only";
import { and, eq, isNull } from "drizzle-orm";
import { apiTokens, memberships } from "@/db/schema";
import { endSessionsOfUser } from "@/lib/auth/sessions";
import { assertCan } from "@/lib/base/permissions";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { ownersLeft } from "./shared";

/**
 * Removes a member, in one transaction: their API tokens for this lab are revoked (each audited),
 * so inviting the same person again never brings an old token back with the new role, and their
 * signed-in sessions end (`lib/auth/sessions.ts`), in every lab.
 */
export async function removeMember({ ctx, input }: { ctx: Ctx; input: { membershipId: string } }) {
  assertCan(ctx.actor, "members:manage");
  if (!isUuid(input.membershipId)) throw notFound("member");
  await ctx.db.transaction(async (tx) => {
    const t = { ...ctx, db: tx };
    const [m] = await tx
      .select()
      .from(memberships)
      .where(and(eq(memberships.id, input.membershipId), eq(memberships.labId, ctx.actor.labId)))
      .for("update");
    if (!m) throw notFound("member");
    if (m.role === "owner" && (await ownersLeft(t, m.id)) === 0) throw conflict("A lab needs at least one owner: make someone else owner first.");
    await tx.delete(memberships).where(eq(memberships.id, m.id));
    const revoked = await tx
      .update(apiTokens)
      .set({ revokedAt: new Date() })
      .where(and(eq(apiTokens.labId, ctx.actor.labId), eq(apiTokens.userId, m.userId), isNull(apiTokens.revokedAt)))
      .returning({ id: apiTokens.id });
    for (const r of revoked) await recordAudit(t, "token.revoke", { type: "api_token", id: r.id }, { reason: "member removed" });
    const sessions = await endSessionsOfUser(tx, m.userId, "removed from a lab");
    await recordAudit(t, "member.remove", { type: "membership", id: m.id }, { userId: m.userId, tokensRevoked: revoked.length, sessionsEnded: sessions });
  });
}
