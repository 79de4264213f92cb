import "server-only";
import { and, eq } from "drizzle-orm";
import { memberships, users } from "@/db/schema";
import { assertCan, ROLE_LABEL } from "@/lib/base/permissions";
import { sendMail } from "@/lib/mail/client";
import { inviteMail } from "@/lib/mail/templates/invite";
import { inviteInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { INVITE_DAYS, insertInvitation } from "./shared";

/** An owner invites someone by e-mail; the link (a one-time secret, only its hash stored) goes out through the mail service. */
export async function inviteMember({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "members:manage");
  const data = parseInput(inviteInput, input);
  const [existing] = await ctx.db
    .select({ id: memberships.id })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.labId, ctx.actor.labId), eq(users.email, data.email)));
  if (existing) throw conflict(`${data.email} is already a member of this lab.`);
  const { labId, userId: invitedBy } = ctx.actor;
  const { invite, link } = await insertInvitation(ctx.db, { labId, email: data.email, role: data.role, invitedBy });
  const mail = inviteMail({ labName: ctx.actor.labName, inviterName: ctx.actor.name, role: ROLE_LABEL[data.role].toLowerCase(), link, expiresDays: INVITE_DAYS });
  await sendMail(ctx.db, { ...mail, to: data.email, idempotencyKey: `invite:${invite.id}`, labId: ctx.actor.labId });
  await recordAudit(ctx, "member.invite", { type: "invitation", id: invite.id }, { email: data.email, role: data.role });
  return { invitation: invite };
}
