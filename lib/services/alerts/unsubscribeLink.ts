import "server-only";
import { signToken, verifyToken } from "@/lib/auth/secrets";
import { env } from "@/lib/env";

/**
 * The unsubscribe link of a crossing e-mail: a token signed with TOKEN_SECRET for this one purpose,
 * naming one person and one sample. It can do nothing but stop that person's e-mails about that
 * sample, so it needs no sign-in and does not expire (an old e-mail's link keeps working).
 */
export const PURPOSE = "unsubscribe-sample";

export function unsubscribeToken(userId: string, sampleId: string): string {
  return signToken(env().TOKEN_SECRET, PURPOSE, { u: userId, s: sampleId });
}

export function unsubscribeUrl(userId: string, sampleId: string): string {
  return `${env().APP_URL}/unsubscribe/${unsubscribeToken(userId, sampleId)}`;
}

export function readToken(token: string): { userId: string; sampleId: string } | null {
  const payload = verifyToken(env().TOKEN_SECRET, PURPOSE, token);
  if (!payload || typeof payload.u !== "string" || typeof payload.s !== "string") return null;
  return { userId: payload.u, sampleId: payload.s };
}
