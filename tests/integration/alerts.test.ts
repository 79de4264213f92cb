import type { ChildProcess } from "node:child_process";
import { randomUUID } from "node:crypto";
import { and, desc, eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { analysisRuns, crossingEvents, crossings, mailLog, memberships, sampleAccess, subscriptions, users } from "@/db/schema";
import { boss, QUEUES, stopBoss } from "@/lib/jobs/queue";
import { afterRefit } from "@/lib/services/alerts/afterRefit";
import { confirmCrossing } from "@/lib/services/alerts/confirmCrossing";
import { deliverEvent } from "@/lib/services/alerts/deliverEvent";
import { listCrossingEvents } from "@/lib/services/alerts/listCrossingEvents";
import { listNotifications } from "@/lib/services/alerts/listNotifications";
import { markNotificationsRead } from "@/lib/services/alerts/markNotificationsRead";
import { unreadCount } from "@/lib/services/alerts/unreadCount";
import { describeUnsubscribe } from "@/lib/services/alerts/describeUnsubscribe";
import { unsubscribeByToken } from "@/lib/services/alerts/unsubscribeByToken";
import { watchSample } from "@/lib/services/alerts/watchSample";
import { watchState } from "@/lib/services/alerts/watchState";
import { saveExtractionSettings } from "@/lib/services/analysis/saveExtractionSettings";
import { saveFieldModel } from "@/lib/services/analysis/saveFieldModel";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { getPhase } from "@/lib/services/spectra/getPhase";
import { createTip } from "@/lib/services/tips/createTip";
import { makeSweep, spectrumToCsv } from "@/lib/spectra";
import { makeLab, rejection, type LabFixture, system } from "../support/fixtures";
import { linkIn, mailsTo, type OutboxMail } from "../support/outbox";
import { bytesOf, startWorkerProcess, stopWorkerProcess, uploadFile, waitForUploads } from "../support/pipeline";

/**
 * Crossing alerts end to end against the real PostgreSQL, the mail fake and a worker process: a
 * sweep from the documented physical model (lib/spectra/synthetic.ts, gap closing at 0.98 V/nm)
 * is pushed through presigned uploads; the worker refits, records the event and e-mails everyone
 * watching. Mail is read back from the fake's outbox, not from our own tables. Work functions and
 * contact distance get small uncertainties (±0.01 eV, ±0.005 nm; no σ for the work-function-mean
 * barrier assumption) so the 95% interval is narrow
 * enough that a new contact distance (0.25 → 0.35 nm, fields ≈ 11% lower) moves the field outside it.
 */
process.env.JOB_EXPIRE_SECONDS = "10";

let lab: LabFixture;
let worker: ChildProcess | undefined;
let sampleId: string;
let closingId: string;
let sessionId: string;
let closingSessionId: string;
let pablo: { id: string; email: string };
let otherSampleId: string;
const sampleName = `GX-12 bilayer ${randomUUID().slice(0, 4)}`;
const closingName = `ST-3 stanene ${randomUUID().slice(0, 4)}`;
const sweep = makeSweep({ n: 20, seed: 31 });
// Critical field far beyond the measured fields (0.85–1.14 V/nm) and a shallow slope: the gap only shrinks.
const closingSweep = makeSweep({ n: 12, seed: 5, criticalField_V_per_nm: 3, slope_eV_per_V_per_nm: 0.3 });

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const about = (name: string) => (m: OutboxMail) => m.subject.startsWith(`${name}:`);

/** Waits until `address` has `n` messages matching `pred`, then for a quiet second to catch extras. */
async function waitForMails(address: string, pred: (m: OutboxMail) => boolean, n: number, timeoutMs = 45_000): Promise<OutboxMail[]> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const got = (await mailsTo(address)).filter(pred);
    if (got.length >= n) {
      await sleep(1500);
      return (await mailsTo(address)).filter(pred);
    }
    if (Date.now() > deadline) throw new Error(`${address}: ${got.length} of ${n} e-mails after ${timeoutMs} ms`);
    await sleep(250);
  }
}

async function waitForRun(runId: string) {
  const deadline = Date.now() + 45_000;
  for (;;) {
    const [run] = await db().select().from(analysisRuns).where(eq(analysisRuns.id, runId));
    if (run.status === "done") return;
    if (Date.now() > deadline) throw new Error(`re-analysis still ${run.status}`);
    await sleep(200);
  }
}

/** Waits until the notify-event job queue has nothing left to do. */
async function waitForQuietQueue() {
  const deadline = Date.now() + 45_000;
  for (;;) {
    const { rows } = await db().execute(`select count(*)::int as n from pgboss.job where name = '${QUEUES.notifyEvent}' and state in ('created','retry','active')`);
    if ((rows[0] as { n: number }).n === 0) return;
    if (Date.now() > deadline) throw new Error("notify-event jobs still pending");
    await sleep(250);
  }
}

const parseSubject = (s: string) => {
  const m = /: (gap closes at|critical field moved to|critical field confirmed at) (\d+\.\d+) V\/nm \[(\d+\.\d+), (\d+\.\d+)\]$/.exec(s);
  if (!m) throw new Error(`unexpected subject: ${s}`);
  return { verb: m[1], field: Number(m[2]), lo: Number(m[3]), hi: Number(m[4]) };
};

async function current(id: string) {
  const [c] = await db().select().from(crossings).where(eq(crossings.sampleId, id)).orderBy(desc(crossings.createdAt)).limit(1);
  return c;
}

beforeAll(async () => {
  lab = await makeLab("Alerts");
  const owner = lab.ctx("owner");
  sampleId = (await createSample({ ctx: owner, input: { name: sampleName, material: "germanene (bilayer)", workFunction_eV: 3.9, workFunctionSigma_eV: 0.01 } })).id;
  closingId = (await createSample({ ctx: owner, input: { name: closingName, material: "stanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.01 } })).id;
  otherSampleId = (await createSample({ ctx: owner, input: { name: `Other ${randomUUID().slice(0, 4)}`, material: "MoS2", workFunction_eV: 4.5, workFunctionSigma_eV: 0.1 } })).id;
  const tip = await createTip({ ctx: owner, input: { label: `W-${randomUUID().slice(0, 4)}`, material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: 0.01 } });
  sessionId = (await createSession({ ctx: owner, input: { sampleId, tipId: tip.id, label: "approach", date: "2026-11-20", temperature_K: 4.5 } })).id;
  closingSessionId = (await createSession({ ctx: owner, input: { sampleId: closingId, tipId: tip.id, label: "approach", date: "2026-11-21", temperature_K: 4.5 } })).id;

  // A second collaborator who sees every sample; the fixture's collaborator is limited to another sample
  // but still has a subscription from before the limit (as if access had been narrowed later).
  const [u] = await db().insert(users).values({ email: `pablo-${randomUUID().slice(0, 8)}@theory.example`, name: "Pablo", passwordHash: null }).returning();
  await db().insert(memberships).values({ labId: lab.lab.id, userId: u.id, role: "collaborator" });
  pablo = { id: u.id, email: u.email };
  await db().insert(sampleAccess).values({ labId: lab.lab.id, sampleId: otherSampleId, userId: lab.people.collaborator.id });
  await db().insert(subscriptions).values({ labId: lab.lab.id, sampleId, userId: lab.people.collaborator.id });

  worker = await startWorkerProcess();
  for (const id of [sampleId, closingId]) {
    const fm = await saveFieldModel({ ctx: lab.ctx("analyst"), input: { sampleId: id, model: { contactDistance_nm: 0.25, contactDistanceSigma_nm: 0.005, assumedBarrierSigma_eV: 0 } } });
    await waitForRun(fm.runId);
  }
}, 90_000);

afterAll(async () => {
  await stopWorkerProcess(worker);
  await stopBoss();
  await closeDb();
});

describe("subscriptions", () => {
  it("owners and analysts watch a new sample by default; microscopists and collaborators do not", async () => {
    expect((await watchState({ ctx: lab.ctx("owner"), input: { sampleId } })).watching).toBe(true);
    expect((await watchState({ ctx: lab.ctx("analyst"), input: { sampleId } })).watching).toBe(true);
    expect((await watchState({ ctx: lab.ctx("microscopist"), input: { sampleId: closingId } })).watching).toBe(false);
    expect((await watchState({ ctx: lab.ctx("collaborator"), input: { sampleId: otherSampleId } })).watching).toBe(false);
  });

  it("a collaborator watches samples they can see, and cannot watch one outside their chosen samples", async () => {
    const pabloCtx = { ...lab.ctx("collaborator"), actor: { ...lab.ctx("collaborator").actor, userId: pablo.id, email: pablo.email, name: "Pablo" } };
    expect(await watchSample({ ctx: pabloCtx, input: { sampleId, watching: true } })).toEqual({ sampleId, watching: true });
    expect((await rejection(watchSample({ ctx: lab.ctx("collaborator"), input: { sampleId, watching: true } }))).status).toBe(404);
    expect((await rejection(watchSample({ ctx: lab.ctx("owner"), input: { sampleId, watching: "maybe" } }))).status).toBe(422);
  });
});

describe("crossing alerts through the pipeline", () => {
  let foundEventId: string;
  let found: ReturnType<typeof parseSubject>;

  it("a sweep that crosses sends exactly one e-mail to each subscriber, with the fitted field and its interval", async () => {
    const ids = [];
    for (const [i, s] of sweep.spectra.entries()) ids.push((await uploadFile(lab.ctx("microscopist"), sessionId, `a-${i}.csv`, bytesOf(spectrumToCsv(s)))).id);
    expect((await waitForUploads(ids)).every((u) => u.status === "done")).toBe(true);

    const owner = await waitForMails(lab.people.owner.email, about(sampleName), 1);
    const analyst = await waitForMails(lab.people.analyst.email, about(sampleName), 1);
    const p = await waitForMails(pablo.email, about(sampleName), 1);
    for (const list of [owner, analyst, p]) expect(list).toHaveLength(1);

    const events = await db().select().from(crossingEvents).where(eq(crossingEvents.sampleId, sampleId));
    expect(events.map((e) => e.kind)).toEqual(["found"]);
    const event = events[0];
    foundEventId = event.id;
    // Files are fitted as they arrive: the event is the first fit that crossed, with the spectra it had then.
    const nAtEvent = (event.data as { nPoints: number }).nPoints;
    expect(nAtEvent).toBeGreaterThanOrEqual(4);
    expect(nAtEvent).toBeLessThanOrEqual(20);
    expect(event.data).toMatchObject({ settingsVersion: 1, fieldModelVersion: 2 });

    found = parseSubject(owner[0].subject);
    expect(found.verb).toBe("gap closes at");
    // The field in the subject is the stored fit's, rounded to the shown decimals …
    expect(Math.abs(found.field - event.fieldVPerNm)).toBeLessThanOrEqual(0.005 + 1e-9);
    expect(Math.abs(found.lo - event.ci95LoVPerNm!)).toBeLessThanOrEqual(0.005 + 1e-9);
    // … and the generating model's critical field lies within it (0.98 V/nm, lib/spectra/synthetic.ts).
    expect(Math.abs(found.field - sweep.truth.criticalField_V_per_nm)).toBeLessThan(0.05);
    expect(found.lo).toBeLessThanOrEqual(sweep.truth.criticalField_V_per_nm);
    expect(found.hi).toBeGreaterThanOrEqual(sweep.truth.criticalField_V_per_nm);
    // The fit of all 20 spectra stays inside the announced interval, so nothing more was sent.
    const phase = await getPhase({ ctx: lab.ctx("owner"), input: { sampleId } });
    expect(phase.crossing.field_V_per_nm!).toBeGreaterThanOrEqual(found.lo);
    expect(phase.crossing.field_V_per_nm!).toBeLessThanOrEqual(found.hi);

    const mail = owner[0];
    expect(mail.to).toEqual([lab.people.owner.email]);
    const sampleUrl = `${process.env.APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`;
    expect(mail.text).toContain(sampleUrl);
    expect(mail.html).toContain(sampleUrl);
    expect(mail.text).toMatch(new RegExp(`Spectra in the fit:\\s+${nAtEvent}\\n`));
    expect(mail.text).toMatch(/extraction settings v1, field model v2/);
    expect(mail.text).toContain("The field is an estimate, not a measurement");
    expect(mail.text).toContain("contact distance 0.25 ± 0.005 nm");
    expect(mail.html).toContain("Stop e-mails about this sample");
    const [log] = await db().select().from(mailLog).where(eq(mailLog.idempotencyKey, `crossing-event:${foundEventId}:${lab.people.owner.id}`));
    expect(log.to).toBe(lab.people.owner.email);
  }, 120_000);

  it("tells nobody who does not watch, and nobody limited to other samples", async () => {
    expect((await mailsTo(lab.people.microscopist.email)).filter(about(sampleName))).toHaveLength(0);
    expect((await mailsTo(lab.people.collaborator.email)).filter(about(sampleName))).toHaveLength(0);
    expect(await unreadCount({ ctx: lab.ctx("collaborator") })).toBe(0);
  });

  it("a sweep that only closes sends none", async () => {
    const ids = [];
    for (const [i, s] of closingSweep.spectra.entries()) ids.push((await uploadFile(lab.ctx("microscopist"), closingSessionId, `c-${i}.csv`, bytesOf(spectrumToCsv(s)))).id);
    expect((await waitForUploads(ids)).every((u) => u.status === "done")).toBe(true);
    const c = await current(closingId);
    expect(c.state).toBe("closing");
    await waitForQuietQueue();
    await sleep(1000);
    expect((await mailsTo(lab.people.owner.email)).filter(about(closingName))).toHaveLength(0);
    expect(await db().select().from(crossingEvents).where(eq(crossingEvents.sampleId, closingId))).toHaveLength(0);
  }, 90_000);

  it("reprocessing (new extraction settings) and retried jobs send no duplicate", async () => {
    const saved = await saveExtractionSettings({ ctx: lab.ctx("analyst"), input: { sampleId, settings: { threshold: { k: 3.5 } } } });
    await waitForRun(saved.runId);
    const c = await current(sampleId);
    expect(c.settingsVersionId).toBe(saved.id);
    expect(c.fieldVPerNm!).toBeGreaterThanOrEqual(found.lo);
    expect(c.fieldVPerNm!).toBeLessThanOrEqual(found.hi);

    // The same decision again, a second delivery job for the same event, and a direct second delivery.
    expect(await afterRefit({ ctx: system(), input: { sampleId: c.sampleId } })).toBeNull();
    const b = await boss();
    const dupJob = await b.send(QUEUES.notifyEvent, { eventId: foundEventId });
    const deadline = Date.now() + 30_000;
    while ((await b.getJobById(QUEUES.notifyEvent, dupJob!))?.state !== "completed") {
      if (Date.now() > deadline) throw new Error("duplicate job did not complete");
      await sleep(250);
    }
    expect(await deliverEvent({ ctx: system(), input: { eventId: foundEventId } })).toEqual({ sent: 0, skipped: 3 });
    await waitForQuietQueue();

    for (const who of [lab.people.owner.email, lab.people.analyst.email, pablo.email]) expect((await mailsTo(who)).filter(about(sampleName))).toHaveLength(1);
    expect(await db().select().from(crossingEvents).where(eq(crossingEvents.sampleId, sampleId))).toHaveLength(1);
  }, 90_000);

  it("a new field model that moves the field outside the interval sends the 'moved' e-mail", async () => {
    const fm = await saveFieldModel({ ctx: lab.ctx("analyst"), input: { sampleId, model: { contactDistance_nm: 0.35, contactDistanceSigma_nm: 0.005, assumedBarrierSigma_eV: 0 } } });
    await waitForRun(fm.runId);
    const moved = (await waitForMails(lab.people.analyst.email, about(sampleName), 2)).filter((m) => m.subject.includes("moved to"));
    expect(moved).toHaveLength(1);
    const m = parseSubject(moved[0].subject);
    const c = await current(sampleId);
    expect(m.field).toBeCloseTo(c.fieldVPerNm!, 2);
    expect(m.field < found.lo || m.field > found.hi).toBe(true);
    // Farther away means a weaker field: the model says the same gap is reached at a lower estimate.
    expect(m.field).toBeLessThan(found.field);
    expect(moved[0].text).toContain(`it was ${found.field.toFixed(2)} V/nm`);
    expect(moved[0].text).toMatch(/field model v3/);
    expect((await mailsTo(lab.people.owner.email)).filter(about(sampleName))).toHaveLength(2);
  }, 90_000);

  it("the unsubscribe link needs no sign-in, changes nothing until confirmed, and stops the e-mails", async () => {
    const [mail] = (await mailsTo(lab.people.owner.email)).filter(about(sampleName));
    const token = decodeURIComponent(linkIn(mail.text, "/unsubscribe/").split("/unsubscribe/")[1]);
    expect(await unsubscribeByToken({ ctx: system(), input: { token: token.slice(0, -2) + "xx" } })).toEqual({ ok: false });
    const seen = await describeUnsubscribe({ ctx: system(), input: { token } });
    expect(seen).toMatchObject({ sampleName, email: lab.people.owner.email, watching: true });
    expect((await describeUnsubscribe({ ctx: system(), input: { token } }))!.watching).toBe(true);
    expect(await unsubscribeByToken({ ctx: system(), input: { token } })).toEqual({ ok: true });
    expect((await watchState({ ctx: lab.ctx("owner"), input: { sampleId } })).watching).toBe(false);

    // Back to the first contact distance: the field moves back, outside the second interval.
    const fm = await saveFieldModel({ ctx: lab.ctx("analyst"), input: { sampleId, model: { contactDistance_nm: 0.25, contactDistanceSigma_nm: 0.005, assumedBarrierSigma_eV: 0 } } });
    await waitForRun(fm.runId);
    await waitForMails(lab.people.analyst.email, about(sampleName), 3);
    await waitForQuietQueue();
    expect((await mailsTo(lab.people.owner.email)).filter(about(sampleName))).toHaveLength(2);
    expect((await mailsTo(pablo.email)).filter(about(sampleName))).toHaveLength(3);
  }, 90_000);

  it("an analyst confirms the crossing: the others hear of it once, the analyst is not mailed about their own action", async () => {
    const c = await current(sampleId);
    expect((await rejection(confirmCrossing({ ctx: lab.ctx("microscopist"), input: { sampleId } }))).status).toBe(403);
    expect((await rejection(confirmCrossing({ ctx: lab.ctx("analyst"), input: { sampleId, crossingId: randomUUID() } }))).status).toBe(409);
    const out = await confirmCrossing({ ctx: lab.ctx("analyst"), input: { sampleId, crossingId: c.id } });
    expect(out).toMatchObject({ crossingId: c.id, status: "confirmed", alreadyConfirmed: false });
    expect((await confirmCrossing({ ctx: lab.ctx("owner"), input: { sampleId } })).alreadyConfirmed).toBe(true);
    const p = await waitForMails(pablo.email, about(sampleName), 4);
    expect(p.filter((m) => m.subject.includes("confirmed at"))).toHaveLength(1);
    expect(p.find((m) => m.subject.includes("confirmed at"))!.text).toContain(`${lab.people.analyst.name} confirmed`);
    await waitForQuietQueue();
    expect((await mailsTo(lab.people.analyst.email)).filter(about(sampleName))).toHaveLength(3);

    const timeline = await listCrossingEvents({ ctx: lab.ctx("collaborator"), input: { sampleId: otherSampleId } });
    expect(timeline.events).toHaveLength(0);
    expect((await rejection(listCrossingEvents({ ctx: lab.ctx("collaborator"), input: { sampleId } }))).status).toBe(404);
    const mine = await listCrossingEvents({ ctx: lab.ctx("owner"), input: { sampleId } });
    expect(mine.events.map((e) => e.kind)).toEqual(["confirmed", "moved", "moved", "found"]);
    expect(mine.current).toMatchObject({ status: "confirmed", confirmable: false });
  }, 90_000);

  it("in the app: one notification per event for each subscriber, with an unread count and mark read", async () => {
    const ctx = lab.ctx("analyst");
    const list = await listNotifications({ ctx });
    // found, moved, moved; the confirmation was the analyst's own.
    expect(list.filter((n) => n.sampleId === sampleId).map((n) => n.kind)).toEqual(["moved", "moved", "found"]);
    const before = await unreadCount({ ctx });
    expect(before).toBe(list.length);
    expect(await markNotificationsRead({ ctx, input: { ids: [list[0].id] } })).toEqual({ updated: 1 });
    expect(await unreadCount({ ctx })).toBe(before - 1);
    // Someone else's notification cannot be marked through my account.
    const [theirs] = await listNotifications({ ctx: lab.ctx("owner") });
    expect(await markNotificationsRead({ ctx, input: { ids: [theirs.id] } })).toEqual({ updated: 0 });
    expect((await listNotifications({ ctx: lab.ctx("owner") }))[0].read).toBe(false);
    await markNotificationsRead({ ctx, input: { all: true } });
    expect(await unreadCount({ ctx })).toBe(0);
  });
});

describe("race-free event decisions", () => {
  it("concurrent decisions about the same sample record one 'found' and at most one 'moved'", async () => {
    const race = await createSample({ ctx: lab.ctx("owner"), input: { name: `Race ${randomUUID().slice(0, 4)}`, material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } });
    const fit = (field: number) => ({
      labId: lab.lab.id,
      sampleId: race.id,
      state: "crossed" as const,
      found: true,
      fieldVPerNm: field,
      ci95LoVPerNm: field - 0.05,
      ci95HiVPerNm: field + 0.05,
      nPoints: 20,
      comparison: {},
    });
    for (let round = 0; round < 5; round++) {
      await db().delete(crossingEvents).where(eq(crossingEvents.sampleId, race.id));
      const [c1] = await db().insert(crossings).values(fit(1.0)).returning();
      const later = (async () => {
        const [c2] = await db().insert(crossings).values(fit(1.5)).returning();
        return afterRefit({ ctx: system(), input: { sampleId: c2.sampleId } });
      })();
      await Promise.all([afterRefit({ ctx: system(), input: { sampleId: c1.sampleId } }), afterRefit({ ctx: system(), input: { sampleId: c1.sampleId } }), later, afterRefit({ ctx: system(), input: { sampleId: c1.sampleId } })]);
      const events = await db().select().from(crossingEvents).where(and(eq(crossingEvents.sampleId, race.id))).orderBy(crossingEvents.createdAt);
      expect(events.filter((e) => e.kind === "found")).toHaveLength(1);
      expect(events.length).toBeLessThanOrEqual(2);
      if (events.length === 2) expect(events[1]).toMatchObject({ kind: "moved", fieldVPerNm: 1.5 });
      await db().delete(crossings).where(eq(crossings.sampleId, race.id));
    }
  });

  it("dates each event when it is decided, so a decision in an older transaction still comes after the event it saw", async () => {
    const s = await createSample({ ctx: lab.ctx("owner"), input: { name: `Order ${randomUUID().slice(0, 4)}`, material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } });
    const row = (field: number) => ({ labId: lab.lab.id, sampleId: s.id, state: "crossed" as const, found: true, fieldVPerNm: field, ci95LoVPerNm: field - 0.05, ci95HiVPerNm: field + 0.05, nPoints: 20, comparison: {} });
    const [c1] = await db().insert(crossings).values(row(1.0)).returning();
    await db().transaction(async (tx) => {
      await tx.execute(sql`select 1`); // this transaction has begun: its now() is fixed from here
      await new Promise((r) => setTimeout(r, 20));
      expect((await afterRefit({ ctx: system(), input: { sampleId: c1.sampleId } }))?.kind).toBe("found"); // another connection, committed
      const [c2] = await tx.insert(crossings).values(row(1.5)).returning();
      expect((await afterRefit({ ctx: { db: tx }, input: { sampleId: c2.sampleId } }))?.kind).toBe("moved"); // decided after 'found', in the older transaction
    });
    const events = await db().select().from(crossingEvents).where(eq(crossingEvents.sampleId, s.id)).orderBy(crossingEvents.createdAt);
    expect(events.map((e) => e.kind)).toEqual(["found", "moved"]);
  });
});
