import "server-only";
import { and, asc, desc, eq, gt, isNull, ne, sql } from "drizzle-orm";
import { invitations, labs, memberships, users, type MemberRole } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import { assertCan, ROLE_LABEL } from "@/lib/base/permissions";
import { newSecret, sha256Hex } from "@/lib/auth/secrets";
import { env } from "@/lib/env";
import { sendMail } from "@/lib/mail/client";
import { inviteMail } from "@/lib/mail/templates/invite";
import { acceptInviteInput, inviteInput, memberRoleSchema } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx, SystemCtx } from "@/lib/base/context";
import { conflict, invalid, notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { isUuid } from "../samples/getSample";

export const INVITE_DAYS = 7;

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
  const secret = newSecret("bxi", 24);
  const [invite] = await ctx.db
    .insert(invitations)
    .values({
      labId: ctx.actor.labId,
      email: data.email,
      role: data.role,
      tokenHash: sha256Hex(secret),
      invitedBy: ctx.actor.userId,
      expiresAt: new Date(Date.now() + INVITE_DAYS * 86_400_000),
    })
    .returning();
  const link = `${env().APP_URL}/invite/${secret}`;
  const mail = inviteMail({ labName: ctx.actor.labName, inviterName: ctx.actor.name, role: ROLE_LABEL[data.role].toLowerCase(), link, expiresDays: INVITE_DAYS });
  await sendMail(ctx.db, { ...mail, to: data.email, idempotencyKey: `invite:${invite.id}`, labId: ctx.actor.labId });
  await recordAudit(ctx, "member.invite", { type: "invitation", id: invite.id }, { email: data.email, role: data.role });
  return { invitation: invite };
}

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

async function ownersLeft(ctx: Ctx, exceptMembershipId: string) {
  const [row] = await ctx.db
    .select({ n: sql<number>`count(*)::int` })
    .from(memberships)
    .where(and(eq(memberships.labId, ctx.actor.labId), eq(memberships.role, "owner"), ne(memberships.id, exceptMembershipId)));
  return row.n;
}

export async function changeRole({ ctx, input }: { ctx: Ctx; input: { membershipId: string; role: unknown } }) {
  assertCan(ctx.actor, "members:manage");
  const role = parseInput(memberRoleSchema, input.role) as MemberRole;
  if (!isUuid(input.membershipId)) throw notFound("member");
  const [m] = await ctx.db.select().from(memberships).where(and(eq(memberships.id, input.membershipId), eq(memberships.labId, ctx.actor.labId)));
  if (!m) throw notFound("member");
  if (m.role === "owner" && role !== "owner" && (await ownersLeft(ctx, m.id)) === 0) {
    throw conflict("A lab needs at least one owner: make someone else owner first.");
  }
  const [row] = await ctx.db.update(memberships).set({ role }).where(eq(memberships.id, m.id)).returning();
  await recordAudit(ctx, "member.role", { type: "membership", id: m.id }, { from: m.role, to: role });
  return row;
}

export async function removeMember({ ctx, input }: { ctx: Ctx; input: { membershipId: string } }) {
  assertCan(ctx.actor, "members:manage");
  if (!isUuid(input.membershipId)) throw notFound("member");
  const [m] = await ctx.db.select().from(memberships).where(and(eq(memberships.id, input.membershipId), eq(memberships.labId, ctx.actor.labId)));
  if (!m) throw notFound("member");
  if (m.role === "owner" && (await ownersLeft(ctx, m.id)) === 0) throw conflict("A lab needs at least one owner: make someone else owner first.");
  await ctx.db.delete(memberships).where(eq(memberships.id, m.id));
  await recordAudit(ctx, "member.remove", { type: "membership", id: m.id }, { userId: m.userId });
}
