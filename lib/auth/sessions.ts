import "server-only";
import { and, eq, isNull, lt } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { authSessions } from "@/db/schema";

/**
 * Signed-in browsers, one row each. The session cookie is a JWT (Auth.js), which on its own stays
 * valid until it expires, wherever a copy of it went; it carries this row's id, and every request
 * checks the row (`lib/auth/index.ts`, the `jwt` callback), so signing out, removal from a lab and
 * a password change end a session on the server, not only in the browser that asked.
 */

/** How long a session lives unless it is ended (the cookie's own lifetime, `session.maxAge`). */
export const SESSION_MAX_AGE_S = 14 * 24 * 3600;

export async function startSession(db: DbOrTx, userId: string): Promise<string> {
  // Rows of sessions long expired are of no use to anyone: cleared as new ones start.
  await db.delete(authSessions).where(and(eq(authSessions.userId, userId), lt(authSessions.createdAt, new Date(Date.now() - 2 * SESSION_MAX_AGE_S * 1000))));
  const [row] = await db.insert(authSessions).values({ userId }).returning({ id: authSessions.id });
  return row.id;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Whether the session `sessionId` of `userId` was started and not ended. */
export async function sessionIsLive(db: DbOrTx, sessionId: unknown, userId: unknown): Promise<boolean> {
  if (typeof sessionId !== "string" || typeof userId !== "string" || !UUID.test(sessionId) || !UUID.test(userId)) return false;
  const [row] = await db
    .select({ id: authSessions.id })
    .from(authSessions)
    .where(and(eq(authSessions.id, sessionId), eq(authSessions.userId, userId), isNull(authSessions.endedAt)));
  return Boolean(row);
}

export async function endSession(db: DbOrTx, sessionId: unknown, reason: string): Promise<void> {
  if (typeof sessionId !== "string" || !UUID.test(sessionId)) return;
  await db.update(authSessions).set({ endedAt: new Date(), endedReason: reason }).where(and(eq(authSessions.id, sessionId), isNull(authSessions.endedAt)));
}

/** Ends every session of a person (removed from a lab, a new password); returns how many were live. */
export async function endSessionsOfUser(db: DbOrTx, userId: string, reason: string): Promise<number> {
  const rows = await db
    .update(authSessions)
    .set({ endedAt: new Date(), endedReason: reason })
    .where(and(eq(authSessions.userId, userId), isNull(authSessions.endedAt)))
    .returning({ id: authSessions.id });
  return rows.length;
}
