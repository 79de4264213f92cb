import "server-only";
import { and, asc, desc, eq, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { apiTokens, labs, memberships, users } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { newSecret, sha256Hex } from "@/lib/auth/secrets";
import { tokenInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx, SystemCtx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { isUuid } from "../samples/getSample";

export async function listTokens({ ctx }: { ctx: Ctx }) {
  assertCan(ctx.actor, "tokens:manage");
  return ctx.db
    .select({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.prefix, userName: users.name, userEmail: users.email, createdAt: apiTokens.createdAt, lastUsedAt: apiTokens.lastUsedAt, revokedAt: apiTokens.revokedAt })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.labId, ctx.actor.labId))
    .orderBy(desc(apiTokens.createdAt));
}

async function insertToken(db: DbOrTx, labId: string, userId: string, name: string, createdBy: string | null) {
  const token = newSecret("bxt", 32);
  const [row] = await db
    .insert(apiTokens)
    .values({ labId, userId, name, tokenHash: sha256Hex(token), prefix: token.slice(0, 10), createdBy })
    .returning({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.prefix, createdAt: apiTokens.createdAt });
  return { token, row };
}

/** Creates a token acting as a member (default: the owner creating it). The token is returned once and never stored. */
export async function createToken({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "tokens:manage");
  const data = parseInput(tokenInput, input);
  const userId = data.userId ?? ctx.actor.userId;
  const [member] = await ctx.db.select({ id: memberships.id }).from(memberships).where(and(eq(memberships.labId, ctx.actor.labId), eq(memberships.userId, userId)));
  if (!member) throw notFound("member");
  const result = await insertToken(ctx.db, ctx.actor.labId, userId, data.name, ctx.actor.userId);
  await recordAudit(ctx, "token.create", { type: "api_token", id: result.row.id }, { name: data.name, for: userId });
  return result;
}

export async function revokeToken({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "tokens:manage");
  if (!isUuid(input.id)) throw notFound("token");
  const [row] = await ctx.db
    .update(apiTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(apiTokens.id, input.id), eq(apiTokens.labId, ctx.actor.labId), isNull(apiTokens.revokedAt)))
    .returning({ id: apiTokens.id });
  if (!row) throw notFound("token");
  await recordAudit(ctx, "token.revoke", { type: "api_token", id: row.id });
}

/**
 * For the server-side command line (`bandcross token create --lab SLUG [--email E]`): a token for
 * a member of the lab, by default its first owner. Whoever can run this already holds the database.
 */
export async function createTokenForLab({ ctx, input }: { ctx: SystemCtx; input: { labSlug: string; email?: string; name?: string } }) {
  const { db } = ctx;
  const { labSlug, email, name } = input;
  const [lab] = await db.select().from(labs).where(eq(labs.slug, labSlug));
  if (!lab) throw notFound("lab");
  const rows = await db
    .select({ userId: users.id, email: users.email, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.labId, lab.id), email ? eq(users.email, email.toLowerCase()) : eq(memberships.role, "owner")))
    .orderBy(asc(memberships.createdAt))
    .limit(1);
  if (!rows[0]) throw notFound(email ? `member ${email}` : "owner");
  const result = await insertToken(db, lab.id, rows[0].userId, name ?? "command line", null);
  return { ...result, lab: { id: lab.id, slug: lab.slug }, member: rows[0] };
}
