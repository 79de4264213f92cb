import "server-only";
import { and, eq } from "drizzle-orm";
import type { SystemCtx } from "@/lib/base/context";
import { labs, samples, subscriptions, users } from "@/db/schema";
import { signToken, verifyToken } from "@/lib/auth/secrets";
import { env } from "@/lib/env";

/**
 * The unsubscribe link of a crossing e-mail: a token signed with TOKEN_SECRET for this one purpose,
 * naming one person and one sample. It can do nothing but stop that person's e-mails about that
 * sample, so it needs no sign-in and does not expire (an old e-mail's link keeps working).
 */
const PURPOSE = "unsubscribe-sample";

export function unsubscribeToken(userId: string, sampleId: string): string {
  return signToken(env().TOKEN_SECRET, PURPOSE, { u: userId, s: sampleId });
}

export function unsubscribeUrl(userId: string, sampleId: string): string {
  return `${env().APP_URL}/unsubscribe/${unsubscribeToken(userId, sampleId)}`;
}

function readToken(token: string): { userId: string; sampleId: string } | null {
  const payload = verifyToken(env().TOKEN_SECRET, PURPOSE, token);
  if (!payload || typeof payload.u !== "string" || typeof payload.s !== "string") return null;
  return { userId: payload.u, sampleId: payload.s };
}

/** For the unsubscribe page (GET, no change): whose link it is, for which sample, and whether they still watch it. */
export async function describeUnsubscribe({ ctx, input }: { ctx: SystemCtx; input: { token: string } }) {
  const { db } = ctx;
  const t = readToken(input.token);
  if (!t) return null;
  const [row] = await db
    .select({ sampleName: samples.name, labName: labs.name, email: users.email })
    .from(samples)
    .innerJoin(labs, eq(labs.id, samples.labId))
    .innerJoin(users, eq(users.id, t.userId))
    .where(eq(samples.id, t.sampleId));
  if (!row) return null;
  const [sub] = await db.select({ id: subscriptions.id }).from(subscriptions).where(and(eq(subscriptions.userId, t.userId), eq(subscriptions.sampleId, t.sampleId)));
  return { ...row, watching: Boolean(sub) };
}

/** The one click on the unsubscribe page (a POST): removes the subscription. Idempotent. */
export async function unsubscribeByToken({ ctx, input }: { ctx: SystemCtx; input: { token: string } }): Promise<{ ok: boolean }> {
  const t = readToken(input.token);
  if (!t) return { ok: false };
  await ctx.db.delete(subscriptions).where(and(eq(subscriptions.userId, t.userId), eq(subscriptions.sampleId, t.sampleId)));
  return { ok: true };
}
