import "server-only";
import type { DbCtx } from "@/lib/base/context";
import type { DbOrTx } from "@/db/client";
import type { Crossing, CrossingEvent, CrossingEventKind } from "@/db/schema";
import { sql } from "drizzle-orm";
import { currentCrossing } from "./currentCrossing";
import { intervalOf } from "./shared";
import { latestEvent } from "./latestEvent";
import { lockSample } from "./lockSample";
import { recordEvent } from "./recordEvent";

async function uploadsInFlight(db: DbOrTx, sampleId: string): Promise<boolean> {
  const r = await db.execute(sql`select 1 from uploads u join measurement_sessions s on s.id = u.session_id
    where s.sample_id = ${sampleId} and u.status in ('queued', 'processing') limit 1`);
  return r.rows.length > 0;
}

/** A fit worth an alert: the gap closes and reopens, with a critical field. */
export const isCrossed = (c: Crossing | null): c is Crossing => Boolean(c && c.state === "crossed" && c.found && c.fieldVPerNm != null);

/**
 * The rule, on the sample's current fit and its latest event:
 * - no event yet and the fit is crossed → `found` (only ever the first time);
 * - a crossed fit on another crossing row whose field lies outside the latest event's 95%
 *   interval → `moved` (an event without an interval never counts as moved from);
 * - anything else (not crossed, inside the interval, the same row) → nothing.
 */
export function decideEvent(current: Crossing | null, last: CrossingEvent | null): CrossingEventKind | null {
  if (!isCrossed(current)) return null;
  if (!last) return "found";
  if (last.crossingId === current.id) return null;
  const ci = intervalOf(last);
  if (!ci) return null;
  return current.fieldVPerNm! < ci[0] || current.fieldVPerNm! > ci[1] ? "moved" : null;
}

/**
 * Runs after every refit of a sample (refitSample calls it, so no path can skip it; it needs only
 * the sample, and reads the current fit itself, so it knows nothing of the refit): decides
 * whether the sample's fit is an event the people watching it must hear about, and records it
 * with its notifications and e-mail job.
 *
 * Race-free by construction: the decision runs in a transaction holding a row lock on the sample
 * (lockSample), and it reads the sample's *current* crossing rather than the one this refit
 * produced. Two workers that refit the same sample at once therefore decide one after the other
 * about the newest fit, and the second sees the first one's event; calling this twice for the same
 * fit is a no-op (also guarded by the unique key on crossing and kind).
 */
export async function afterRefit({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<CrossingEvent | null> {
  const { sampleId } = input;
  return ctx.db.transaction(async (tx) => {
    const locked = { ...ctx, db: tx };
    await lockSample({ ctx: locked, input: { sampleId } });
    // While files of this sample are still queued or being processed, wait: the refit after the
    // last of them decides, so a folder pushed at once gives one alert about all of it.
    if (await uploadsInFlight(tx, sampleId)) return null;
    const current = await currentCrossing({ ctx: locked, input: { sampleId } });
    const last = await latestEvent({ ctx: locked, input: { sampleId } });
    const kind = decideEvent(current, last);
    if (!kind || !current) return null;
    const extra = kind === "moved" && last ? { previousEventId: last.id, previousField_V_per_nm: last.fieldVPerNm, previousCi95_V_per_nm: intervalOf(last) } : {};
    return recordEvent({ ctx: locked, input: { crossing: current, kind, extra } });
  });
}
