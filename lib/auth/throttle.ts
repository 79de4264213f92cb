import "server-only";
import { inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { signInThrottle } from "@/db/schema";

/**
 * Failed sign-ins slow down the next try, per key, with a wait that doubles from one second after
 * the free tries and stops at a cap, rather than a lock: the OWASP Authentication Cheat Sheet's
 * advice (lockouts let anyone lock an account out; an exponential delay does not), with NIST SP
 * 800-63B §5.2.2's rate limiting in mind. Keys, in `lib/auth/credentials.ts`:
 *
 * - `account:` an e-mail, for tries from browsers it does not know: its cap is a minute, so a
 *   stranger hammering it keeps its owner waiting a minute at most;
 * - `client:` an address (`lib/auth/client.ts`), across e-mails: stricter, a cap of 15 minutes;
 * - `device:` a browser where the account signed in before (its device cookie, `device.ts`):
 *   tries from it count here only, so the owner's own browser is never slowed by a stranger.
 *
 * A key's count is forgotten FORGET_MINUTES after its last wait ended. Kept in PostgreSQL, so every
 * app process shares the counts.
 */
export const LIMITS = {
  account: { free: 5, capSeconds: 60 },
  client: { free: 10, capSeconds: 15 * 60 },
  device: { free: 5, capSeconds: 15 * 60 },
} as const;
export type ThrottleKind = keyof typeof LIMITS;
export const FORGET_MINUTES = 15;

export interface ThrottleKey {
  kind: ThrottleKind;
  id: string;
}
const keyOf = (k: ThrottleKey) => `${k.kind}:${k.id}`;

/** The wait in seconds after the `failures`-th failure in a row: none for the free ones, then 1, 2, 4 … up to the cap. */
export function waitAfter(kind: ThrottleKind, failures: number): number {
  const { free, capSeconds } = LIMITS[kind];
  return failures <= free ? 0 : Math.min(2 ** (failures - free - 1), capSeconds);
}

/** Seconds until every key lets a try through (0: now). */
export async function secondsToWait(db: DbOrTx, keys: ThrottleKey[], now = new Date()): Promise<number> {
  if (!keys.length) return 0;
  const rows = await db.select().from(signInThrottle).where(inArray(signInThrottle.key, keys.map(keyOf)));
  const latest = Math.max(now.getTime(), ...rows.map((r) => r.blockedUntil.getTime()));
  return Math.ceil((latest - now.getTime()) / 1000);
}

/** Counts one failure on each key and sets its wait, in one statement per key (concurrent failures all count). */
export async function recordFailure(db: DbOrTx, keys: ThrottleKey[], now = new Date()): Promise<void> {
  const t = signInThrottle;
  for (const k of keys) {
    const { free, capSeconds } = LIMITS[k.kind];
    const at = sql`${now.toISOString()}::timestamptz`;
    const forgotten = sql`${t.blockedUntil} < ${at} - make_interval(mins => ${FORGET_MINUTES})`;
    const count = sql`(case when ${forgotten} then 1 else ${t.failures} + 1 end)`;
    const wait = (n: typeof count) => sql`make_interval(secs => least(${capSeconds}, case when ${n} > ${free} then power(2, ${n} - ${free} - 1) else 0 end))`;
    await db
      .insert(t)
      .values({ key: keyOf(k), windowStart: now, failures: 1, blockedUntil: new Date(now.getTime() + waitAfter(k.kind, 1) * 1000) })
      .onConflictDoUpdate({
        target: t.key,
        set: {
          failures: count,
          windowStart: sql`case when ${forgotten} then ${at} else ${t.windowStart} end`,
          blockedUntil: sql`${at} + ${wait(count)}`,
        },
      });
  }
}

export async function clearFailures(db: DbOrTx, keys: ThrottleKey[]): Promise<void> {
  if (keys.length) await db.delete(signInThrottle).where(inArray(signInThrottle.key, keys.map(keyOf)));
}
