import "server-only";
import { and, eq, isNull } from "drizzle-orm";
import { invitations } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";

export async function revokeInvitation({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "members:manage");
  if (!isUuid(input.id)) throw notFound("invitation");
  const [row] = await ctx.db
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(and(eq(invitations.id, input.id), eq(invitations.labId, ctx.actor.labId), isNull(invitations.acceptedAt)))
    .returning();
  if (!row) throw notFound("invitation");
  await recordAudit(ctx, "member.invite.revoke", { type: "invitation", id: row.id });
}
