import "server-only";
import { eq } from "drizzle-orm";
import type { SystemCtx } from "@/lib/base/context";
import { crossingEvents, crossings, fieldModelVersions, labs, notifications, samples, users, type StoredFieldModel } from "@/db/schema";
import { env } from "@/lib/env";
import { kappaSourceText } from "@/lib/spectra";
import { sendMail } from "@/lib/mail/client";
import { crossingMail, type CrossingMailInput } from "@/lib/mail/templates/crossing";
import { recipientsOf } from "./recipientsOf";
import { intervalOf } from "./shared";
import { unsubscribeUrl } from "./unsubscribeLink";

/** The idempotency key of one crossing e-mail: one per event and person, checked in mail_log and by the mail service. */
export const eventMailKey = (eventId: string, userId: string) => `crossing-event:${eventId}:${userId}`;

/** The field model's assumptions in one line, for beside the number. */
export function assumptionsLine(m: Partial<StoredFieldModel> & { decayConstantSource?: string }, sampleWf: { ev: number; sigma: number }): string {
  const n = (v: number) => String(Number(v.toFixed(3)));
  const dc = m.contactDistance_nm != null ? `${n(m.contactDistance_nm)}${m.contactDistanceSigma_nm ? ` ± ${n(m.contactDistanceSigma_nm)}` : ""} nm` : "the default";
  const barrier =
    m.decayConstantSource === "curves" && m.curves
      ? `I(z) curves (${kappaSourceText(m)})`
      : m.barrierHeight_eV != null
        ? `a measured barrier of ${m.barrierHeight_eV.toFixed(2)} eV`
        : "the mean of the two work functions";
  const screening = m.screening != null && m.screening !== 1 ? `, screening factor ${m.screening}` : ", no screening";
  return `E = (Φtip − Φsample)/(e·d) with Φsample ${sampleWf.ev.toFixed(2)} ± ${sampleWf.sigma.toFixed(2)} eV and each session's tip, d from the setpoint conductance with contact distance ${dc} and a decay constant from ${barrier}${screening}.`;
}

/**
 * The notify-event job: e-mails one crossing event to the people notified of it who still watch
 * the sample and may still see it. Each message has the key crossing-event:{eventId}:{userId};
 * a key already in mail_log is skipped, so a retried job or a second run never sends twice. One
 * failed address does not stop the others; the job then fails and is retried for the rest.
 */
export async function deliverEvent({ ctx, input }: { ctx: SystemCtx; input: { eventId: string } }): Promise<{ sent: number; skipped: number }> {
  const { db } = ctx;
  const { eventId } = input;
  const [row] = await db
    .select({ event: crossingEvents, crossing: crossings, sample: samples, lab: labs })
    .from(crossingEvents)
    .innerJoin(crossings, eq(crossings.id, crossingEvents.crossingId))
    .innerJoin(samples, eq(samples.id, crossingEvents.sampleId))
    .innerJoin(labs, eq(labs.id, crossingEvents.labId))
    .where(eq(crossingEvents.id, eventId));
  if (!row) return { sent: 0, skipped: 0 };
  const { event, crossing, sample, lab } = row;
  const [fv] = crossing.fieldModelVersionId ? await db.select().from(fieldModelVersions).where(eq(fieldModelVersions.id, crossing.fieldModelVersionId)) : [];
  const notified = new Set((await db.select({ userId: notifications.userId }).from(notifications).where(eq(notifications.eventId, eventId))).map((n) => n.userId));
  const recipients = (await recipientsOf({ ctx, input: { sampleId: sample.id } })).filter((r) => notified.has(r.userId));
  const d = event.data as Record<string, unknown>;
  const num = (v: unknown) => (typeof v === "number" ? v : null);
  let confirmedBy: string | null = null;
  if (event.kind === "confirmed" && typeof d.confirmedBy === "string") {
    const [u] = await db.select({ name: users.name }).from(users).where(eq(users.id, d.confirmedBy));
    confirmedBy = u?.name ?? null;
  }
  const prevCi = Array.isArray(d.previousCi95_V_per_nm) ? (d.previousCi95_V_per_nm as [number, number]) : null;
  const base: Omit<CrossingMailInput, "unsubscribeUrl"> = {
    kind: event.kind as CrossingMailInput["kind"],
    sampleName: sample.name,
    labName: lab.name,
    field_V_per_nm: event.fieldVPerNm,
    ci95_V_per_nm: intervalOf(event),
    previous: num(d.previousField_V_per_nm) != null ? { field_V_per_nm: num(d.previousField_V_per_nm)!, ci95_V_per_nm: prevCi } : null,
    state: String(d.state ?? crossing.state),
    status: event.kind === "confirmed" ? "confirmed" : String(d.status ?? crossing.status),
    slopes: { below: num(d.slopeBelow_eV_per_V_per_nm), above: num(d.slopeAbove_eV_per_V_per_nm) },
    nSpectra: num(d.nPoints) ?? crossing.nPoints,
    settingsVersion: num(d.settingsVersion),
    fieldModelVersion: num(d.fieldModelVersion),
    assumptions: assumptionsLine((fv?.model ?? {}) as Partial<StoredFieldModel>, { ev: sample.workFunctionEv, sigma: sample.workFunctionSigmaEv }),
    confirmedBy,
    sampleUrl: `${env().APP_URL}/labs/${lab.slug}/samples/${sample.id}`,
    at: event.createdAt.toISOString(),
  };
  let sent = 0;
  let skipped = notified.size - recipients.length;
  const failures: string[] = [];
  for (const r of recipients) {
    const link = unsubscribeUrl(r.userId, sample.id);
    const mail = crossingMail({ ...base, unsubscribeUrl: link });
    try {
      const out = await sendMail(db, {
        to: r.email,
        ...mail,
        idempotencyKey: eventMailKey(event.id, r.userId),
        labId: lab.id,
        headers: { "List-Unsubscribe": `<${link}>` },
      });
      if (out.sent) sent++;
      else skipped++;
    } catch (e) {
      failures.push((e as Error).message);
    }
  }
  if (failures.length) throw new Error(`${failures.length} of ${recipients.length} e-mails not sent: ${failures[0]}`);
  return { sent, skipped };
}
