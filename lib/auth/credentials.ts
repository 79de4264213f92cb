import "server-only";
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { users } from "@/db/schema";
import { deviceOf } from "./device";
import { verifyPassword } from "./password";
import { clearFailures, recordFailure, secondsToWait, type ThrottleKey } from "./throttle";

export type CredentialsResult =
  | { ok: true; user: { id: string; email: string; name: string } }
  | { ok: false; reason: "invalid" }
  | { ok: false; reason: "throttled"; retryAfterSeconds: number };

/**
 * Checks an e-mail and password. Unknown e-mail and wrong password give the same answer and take
 * the same time. Failures slow further tries (`throttle.ts`): from a browser where this account
 * signed in before (`device`, its device cookie's value) on that browser alone; from anywhere else
 * on the account and on the client's address (`client`, `lib/auth/client.ts`).
 */
export async function verifyCredentials({
  db,
  input,
  now = new Date(),
}: {
  db: DbOrTx;
  input: { email: string; password: string; client?: string; device?: string };
  now?: Date;
}): Promise<CredentialsResult> {
  const email = input.email.trim().toLowerCase();
  const device = input.device ? deviceOf(input.device, email) : null;
  const keys: ThrottleKey[] = device
    ? [{ kind: "device", id: device }]
    : [{ kind: "account", id: email }, ...(input.client ? [{ kind: "client" as const, id: input.client }] : [])];
  const wait = await secondsToWait(db, keys, now);
  if (wait > 0) return { ok: false, reason: "throttled", retryAfterSeconds: wait };
  const [user] = await db.select().from(users).where(eq(users.email, email));
  const ok = await verifyPassword(input.password, user?.passwordHash);
  if (!ok || !user) {
    await recordFailure(db, keys, now);
    return { ok: false, reason: "invalid" };
  }
  await clearFailures(db, [{ kind: "account", id: email }, ...(device ? [{ kind: "device" as const, id: device }] : [])]);
  return { ok: true, user: { id: user.id, email: user.email, name: user.name } };
}
