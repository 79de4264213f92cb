import "server-only";
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { users } from "@/db/schema";
import { verifyPassword } from "./password";
import { clearFailures, isThrottled, recordFailure } from "./throttle";

export type CredentialsResult =
  | { ok: true; user: { id: string; email: string; name: string } }
  | { ok: false; reason: "invalid" | "throttled" };

/**
 * Checks an e-mail and password. Unknown e-mail and wrong password give the same answer and take
 * the same time; repeated failures for one e-mail or one client address are throttled.
 */
export async function verifyCredentials({
  db,
  input,
}: {
  db: DbOrTx;
  input: { email: string; password: string; clientKey?: string };
}): Promise<CredentialsResult> {
  const email = input.email.trim().toLowerCase();
  const keys = [`email:${email}`, ...(input.clientKey ? [`client:${input.clientKey}`] : [])];
  if (await isThrottled(db, keys)) return { ok: false, reason: "throttled" };
  const [user] = await db.select().from(users).where(eq(users.email, email));
  const ok = await verifyPassword(input.password, user?.passwordHash);
  if (!ok || !user) {
    await recordFailure(db, keys);
    return { ok: false, reason: "invalid" };
  }
  await clearFailures(db, `email:${email}`);
  return { ok: true, user: { id: user.id, email: user.email, name: user.name } };
}
