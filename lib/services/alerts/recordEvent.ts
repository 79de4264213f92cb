import "server-only";
import { eq, sql } from "drizzle-orm";
import type { DbCtx } from "@/lib/base/context";
import { crossingEvents, extractionSettingsVersions, fieldModelVersions, labs, notifications, samples, type Crossing, type CrossingEvent, type CrossingEventKind } from "@/db/schema";
import { enqueueNotifyEvent } from "@/lib/jobs/queue";
import { crossingHeadline } from "@/lib/mail/templates/crossing";
import { recipientsOf } from "./recipientsOf";
import { intervalOf } from "./shared";

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
