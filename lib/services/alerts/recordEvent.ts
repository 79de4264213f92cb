import "server-only";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import type { DbCtx } from "@/lib/base/context";
import { crossingEvents, crossings, extractionSettingsVersions, fieldModelVersions, labs, notifications, samples, type Crossing, type CrossingEvent, type CrossingEventKind } from "@/db/schema";
import { enqueueNotifyEvent } from "@/lib/jobs/queue";
import { crossingHeadline } from "@/lib/mail/templates/crossing";
import { recipientsOf } from "./recipients";

/**
 * Serialises every "is this a new event?" decision about one sample: a row lock on the sample,
 * held until the caller's transaction ends. Two workers refitting the same sample at once (or a
 * refit racing a confirmation) take turns here, and the second one sees the event the first one
 * stored. The unique index on (crossing_id, kind) backs this up for the same crossing row.
 */
export async function lockSample({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<void> {
  await ctx.db.execute(sql`select id from ${samples} where ${samples.id} = ${input.sampleId} for update`);
}

/** The sample's newest crossing of all regions together: the current fit. */
export async function currentCrossing({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<Crossing | null> {
  const [c] = await ctx.db
    .select()
    .from(crossings)
    .where(and(eq(crossings.sampleId, input.sampleId), isNull(crossings.region)))
    .orderBy(desc(crossings.createdAt))
    .limit(1);
  return c ?? null;
}

/** The sample's latest event of any kind, or null. */
export async function latestEvent({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<CrossingEvent | null> {
  const [e] = await ctx.db.select().from(crossingEvents).where(eq(crossingEvents.sampleId, input.sampleId)).orderBy(desc(crossingEvents.createdAt)).limit(1);
  return e ?? null;
}

export const intervalOf = (r: { ci95LoVPerNm: number | null; ci95HiVPerNm: number | null }): [number, number] | null =>
  r.ci95LoVPerNm != null && r.ci95HiVPerNm != null ? [r.ci95LoVPerNm, r.ci95HiVPerNm] : null;

/**
 * Stores one event about a crossing, inside the caller's transaction (which holds lockSample):
 * the event row with its versions, one in-app notification per recipient, and the job that
 * e-mails them. Returns null when this crossing already has an event of this kind.
 */
export async function recordEvent({
  ctx,
  input,
}: {
  ctx: DbCtx;
  input: { crossing: Crossing; kind: CrossingEventKind; extra?: Record<string, unknown>; excludeUserId?: string };
}): Promise<CrossingEvent | null> {
  const tx = ctx.db;
  const c = input.crossing;
  if (c.fieldVPerNm == null) return null;
  const [sv] = c.settingsVersionId ? await tx.select({ version: extractionSettingsVersions.version }).from(extractionSettingsVersions).where(eq(extractionSettingsVersions.id, c.settingsVersionId)) : [];
  const [fv] = c.fieldModelVersionId ? await tx.select({ version: fieldModelVersions.version }).from(fieldModelVersions).where(eq(fieldModelVersions.id, c.fieldModelVersionId)) : [];
  const [event] = await tx
    .insert(crossingEvents)
    .values({
      labId: c.labId,
      sampleId: c.sampleId,
      crossingId: c.id,
      kind: input.kind,
      fieldVPerNm: c.fieldVPerNm,
      ci95LoVPerNm: c.ci95LoVPerNm,
      ci95HiVPerNm: c.ci95HiVPerNm,
      // The time of the decision, taken under the sample's lock: now() is when the transaction
      // began, which for two racing refits can put the later decision first, and the latest
      // event (what the next decision compares with) is found by this column.
      createdAt: sql`clock_timestamp()`,
      data: {
        state: c.state,
        status: c.status,
        nPoints: c.nPoints,
        slopeBelow_eV_per_V_per_nm: c.slopeBelowEvPerVPerNm,
        slopeAbove_eV_per_V_per_nm: c.slopeAboveEvPerVPerNm,
        settingsVersionId: c.settingsVersionId,
        settingsVersion: sv?.version ?? null,
        fieldModelVersionId: c.fieldModelVersionId,
        fieldModelVersion: fv?.version ?? null,
        ...input.extra,
      },
    })
    .onConflictDoNothing({ target: [crossingEvents.crossingId, crossingEvents.kind] })
    .returning();
  if (!event) return null;

  const [s] = await tx.select({ name: samples.name, slug: labs.slug }).from(samples).innerJoin(labs, eq(labs.id, samples.labId)).where(eq(samples.id, c.sampleId));
  const title = crossingHeadline({ kind: input.kind, sampleName: s.name, field_V_per_nm: c.fieldVPerNm, ci95_V_per_nm: intervalOf(c) });
  const body =
    input.kind === "found"
      ? `The fit of ${c.nPoints} spectra closes and reopens (settings v${sv?.version ?? "?"}, field model v${fv?.version ?? "?"}).`
      : input.kind === "moved"
        ? `A new fit of ${c.nPoints} spectra lies outside the earlier 95% interval (settings v${sv?.version ?? "?"}, field model v${fv?.version ?? "?"}).`
        : `Confirmed${typeof input.extra?.confirmedByName === "string" ? ` by ${input.extra.confirmedByName}` : ""} (${c.nPoints} spectra, settings v${sv?.version ?? "?"}, field model v${fv?.version ?? "?"}).`;
  const recipients = (await recipientsOf({ ctx, input: { sampleId: c.sampleId } })).filter((r) => r.userId !== input.excludeUserId);
  if (recipients.length) {
    await tx
      .insert(notifications)
      .values(recipients.map((r) => ({ labId: c.labId, userId: r.userId, eventId: event.id, title, body, href: `/labs/${s.slug}/samples/${c.sampleId}` })))
      .onConflictDoNothing();
    await enqueueNotifyEvent(tx, { eventId: event.id });
  }
  return event;
}
