import "server-only";
import { and, eq, isNull, lt, or } from "drizzle-orm";
import { db as database, type DbOrTx } from "@/db/client";
import { apiTokens, labs, memberships, users } from "@/db/schema";
import type { Actor, Ctx } from "@/lib/base/context";
import { badRequest, notFound, unauthorized } from "@/lib/base/errors";
import { sha256Hex } from "./secrets";

/**
 * Resolving who acts: a signed-in user in a lab they belong to, or an API token (bound to one lab
 * and one member, acting with that member's current role). A lab the user does not belong to is
 * "not found", so its existence is not revealed.
 */
/** The columns an actor is made of (user, lab, role), shared by both ways of resolving one. */
const actorColumns = {
  userId: users.id,
  email: users.email,
  name: users.name,
  labId: labs.id,
  labSlug: labs.slug,
  labName: labs.name,
  role: memberships.role,
};

export async function actorForUser(db: DbOrTx, userId: string, labSlug: string): Promise<Actor> {
  const [row] = await db
    .select(actorColumns)
    .from(memberships)
    .innerJoin(labs, eq(labs.id, memberships.labId))
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.userId, userId), eq(labs.slug, labSlug)));
  if (!row) throw notFound("lab");
  return { ...row, via: "session" };
}

export async function actorForToken(db: DbOrTx, token: string): Promise<Actor> {
  const [row] = await db
    .select({ tokenId: apiTokens.id, lastUsedAt: apiTokens.lastUsedAt, ...actorColumns })
    .from(apiTokens)
    .innerJoin(labs, eq(labs.id, apiTokens.labId))
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .innerJoin(memberships, and(eq(memberships.userId, apiTokens.userId), eq(memberships.labId, apiTokens.labId)))
    .where(and(eq(apiTokens.tokenHash, sha256Hex(token)), isNull(apiTokens.revokedAt)));
  if (!row) throw unauthorized("That API token is unknown or revoked.");
  // Record use at most once a minute per token, so busy scripts do not write on every request.
  await db
    .update(apiTokens)
    .set({ lastUsedAt: new Date() })
    .where(and(eq(apiTokens.id, row.tokenId), or(isNull(apiTokens.lastUsedAt), lt(apiTokens.lastUsedAt, new Date(Date.now() - 60_000)))));
  const { tokenId, lastUsedAt: _ignored, ...actor } = row;
  return { ...actor, via: "token", tokenId };
}

/**
 * For HTTP API requests: a bearer token if present, otherwise the browser session. With a session,
 * the lab comes from the `x-bandcross-lab` header or `?lab=` (a slug), or is the user's only lab.
 */
export async function actorForRequest(
  db: DbOrTx,
  request: Request,
  sessionUserId: () => Promise<string | undefined>,
): Promise<Actor> {
  const header = request.headers.get("authorization");
  if (header) {
    const match = /^Bearer\s+(\S+)$/i.exec(header);
    if (!match) throw unauthorized("Send the token as 'Authorization: Bearer <token>'.");
    return actorForToken(db, match[1]);
  }
  const userId = await sessionUserId();
  if (!userId) throw unauthorized();
  const slug = request.headers.get("x-bandcross-lab") ?? new URL(request.url).searchParams.get("lab");
  if (slug) return actorForUser(db, userId, slug);
  const mine = await db
    .select({ slug: labs.slug })
    .from(memberships)
    .innerJoin(labs, eq(labs.id, memberships.labId))
    .where(eq(memberships.userId, userId));
  if (mine.length === 1) return actorForUser(db, userId, mine[0].slug);
  throw badRequest("You belong to several labs: name one with the 'x-bandcross-lab' header or '?lab=<slug>'.");
}

/** The service context of a signed-in user in one of their labs (server pages and actions). */
export async function contextForUser(userId: string, labSlug: string): Promise<Ctx> {
  const db = database();
  return { db, actor: await actorForUser(db, userId, labSlug) };
}

/** The service context of an HTTP API request (bearer token or browser session, as `actorForRequest`). */
export async function contextForRequest(request: Request, sessionUserId: () => Promise<string | undefined>): Promise<Ctx> {
  const db = database();
  return { db, actor: await actorForRequest(db, request, sessionUserId) };
}
