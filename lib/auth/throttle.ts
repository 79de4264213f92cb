import "server-only";
import { eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { signInThrottle } from "@/db/schema";

/**
 * Failed sign-ins are limited per e-mail and per client address: at most MAX_FAILURES in a
 * WINDOW_MINUTES window. Kept in PostgreSQL so every app process shares the count.
 */
export const MAX_FAILURES = 8;
export const WINDOW_MINUTES = 15;

export async function isThrottled(db: DbOrTx, keys: string[]): Promise<boolean> {
  for (const key of keys) {
    const [row] = await db.select().from(signInThrottle).where(eq(signInThrottle.key, key));
    if (!row) continue;
    const fresh = Date.now() - row.windowStart.getTime() < WINDOW_MINUTES * 60_000;
    if (fresh && row.failures >= MAX_FAILURES) return true;
  }
  return false;
}

export async function recordFailure(db: DbOrTx, keys: string[]): Promise<void> {
  for (const key of keys) {
    await db
      .insert(signInThrottle)
      .values({ key, windowStart: new Date(), failures: 1 })
      .onConflictDoUpdate({
        target: signInThrottle.key,
        set: {
          failures: sql`case when ${signInThrottle.windowStart} < now() - make_interval(mins => ${WINDOW_MINUTES}) then 1 else ${signInThrottle.failures} + 1 end`,
          windowStart: sql`case when ${signInThrottle.windowStart} < now() - make_interval(mins => ${WINDOW_MINUTES}) then now() else ${signInThrottle.windowStart} end`,
        },
      });
  }
}

export async function clearFailures(db: DbOrTx, key: string): Promise<void> {
  await db.delete(signInThrottle).where(eq(signInThrottle.key, key));
}
