import { randomUUID } from "node:crypto";
import type { Browser } from "playwright-core";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { subscriptions } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { saveFieldModel } from "@/lib/services/analysis/saveFieldModel";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { createTip } from "@/lib/services/tips/createTip";
import { makeSweep, spectrumToCsv } from "@/lib/spectra";
import { APP_URL, launch, shot, signedIn as signedInAs } from "../support/browser";
import { makeLab, TEST_PASSWORD, type LabFixture } from "../support/fixtures";
import { linkIn, mailsTo, type OutboxMail } from "../support/outbox";
import { bytesOf, uploadFile, waitForUploads } from "../support/pipeline";

/**
 * Crossing alerts in the browser, against the built app and the worker that `npm test` serves:
 * a sweep from the physical model (critical field 0.98 V/nm) is uploaded, and the e-mail, the
 * notifications page, the sample's timeline, the unsubscribe page and the outbox page are looked at.
 */
let browser: Browser;
let lab: LabFixture;
let sampleId: string;
let ownerMail: OutboxMail;
const sampleName = `GX-12 bilayer ${randomUUID().slice(0, 4)}`;

const signedIn = (email: string) => signedInAs(browser, email, TEST_PASSWORD, lab.lab.slug, { width: 1360, height: 900 });

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Alerts browser");
  const owner = lab.ctx("owner");
  sampleId = (await createSample({ ctx: owner, input: { name: sampleName, material: "germanene (bilayer)", substrate: "MoS2", workFunction_eV: 3.9, workFunctionSigma_eV: 0.01 } })).id;
  await saveFieldModel({ ctx: lab.ctx("analyst"), input: { sampleId, model: { contactDistance_nm: 0.25, contactDistanceSigma_nm: 0.005 } } });
  const tip = await createTip({ ctx: owner, input: { label: `W-${randomUUID().slice(0, 4)}`, material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: 0.01 } });
  const sessionId = (await createSession({ ctx: owner, input: { sampleId, tipId: tip.id, label: "approach", date: "2026-11-20", temperature_K: 4.5 } })).id;
  const sweep = makeSweep({ n: 20, seed: 31 });
  const ids = [];
  for (const [i, s] of sweep.spectra.entries()) ids.push((await uploadFile(lab.ctx("microscopist"), sessionId, `a-${i}.csv`, bytesOf(spectrumToCsv(s)))).id);
  await waitForUploads(ids);
  const deadline = Date.now() + 60_000;
  for (;;) {
    const got = (await mailsTo(lab.people.owner.email)).filter((m) => m.subject.startsWith(sampleName));
    if (got.length && (await mailsTo(lab.people.analyst.email)).some((m) => m.subject.startsWith(sampleName))) {
      ownerMail = got[0];
      break;
    }
    if (Date.now() > deadline) throw new Error("no crossing e-mail arrived");
    await new Promise((r) => setTimeout(r, 300));
  }
}, 150_000);

afterAll(async () => {
  await browser?.close();
  await stopBoss();
  await closeDb();
});

describe("the crossing e-mail", () => {
  it("renders in chromium with the field, the summary, the link to the sample and an unsubscribe link", async () => {
    const context = await browser.newContext({ viewport: { width: 720, height: 900 } });
    const page = await context.newPage();
    await page.setContent(ownerMail.html, { waitUntil: "load" });
    const file = await shot(page, "crossing-email");
    expect(file).toMatch(/crossing-email\.png$/);
    expect(await page.textContent("h1")).toBe(ownerMail.subject);
    expect(ownerMail.subject).toMatch(/: gap closes at 0\.9\d V\/nm \[\d\.\d\d, \d\.\d\d\]$/);
    const button = await page.getAttribute("a:has-text('Open the phase plot')", "href");
    expect(button).toBe(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    expect(await page.isVisible("text=The field is an estimate, not a measurement")).toBe(true);
    expect(await page.getAttribute("a:has-text('Stop e-mails about this sample')", "href")).toContain("/unsubscribe/");
    await context.close();
  });

  it("the outbox page lists it and shows it (development pages enabled for the test stack)", async () => {
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 } });
    const page = await context.newPage();
    const res = await page.goto(`${APP_URL}/dev/mail?to=${encodeURIComponent(lab.people.owner.email)}`);
    expect(res?.status()).toBe(200);
    await page.waitForSelector(`[data-testid="outbox-list"] >> text=${ownerMail.subject}`);
    expect(await page.textContent('[data-testid="outbox-message"]')).toContain(lab.people.owner.email);
    await shot(page, "dev-mail-outbox");
    await context.close();
  });
});

describe("in the app", () => {
  it("the analyst sees an unread badge, the notification, and marks all read", async () => {
    const { context, page } = await signedIn(lab.people.analyst.email);
    expect(await page.textContent('[data-testid="unread-count"]')).toBe("1");
    await page.click("nav >> text=Alerts");
    await page.waitForSelector(`[data-testid="notification"][data-read="false"] >> text=${sampleName}`);
    await shot(page, "notifications");
    await page.click('[data-testid="mark-all-read"]');
    await page.waitForSelector('[data-testid="notification"][data-read="true"]');
    await page.waitForSelector('[data-testid="unread-count"]', { state: "detached" });
    await context.close();
  });

  it("the sample page shows the timeline, the watch toggle, and lets the analyst confirm", async () => {
    const { context, page } = await signedIn(lab.people.analyst.email);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    await page.waitForSelector('[data-testid="crossing-event-found"]');
    await page.waitForSelector('[data-testid="watch-toggle"][aria-pressed="true"]');
    await page.click('[data-testid="confirm-crossing"]');
    await page.waitForSelector('[data-testid="crossing-event-confirmed"]');
    await shot(page, "sample-crossing-timeline");
    // The same verb over the HTTP API, with the browser session: already confirmed, and a bad body is a 422.
    const api = `${APP_URL}/api/v1/samples/${sampleId}/crossing/confirm?lab=${lab.lab.slug}`;
    const again = await page.request.post(api, { data: {} });
    expect(again.status()).toBe(200);
    expect(await again.json()).toMatchObject({ status: "confirmed", alreadyConfirmed: true });
    const bad = await page.request.post(api, { data: { crossingId: "not-a-uuid" } });
    expect(bad.status()).toBe(422);
    expect((await bad.json()).error.code).toBe("invalid");
    await page.click('[data-testid="watch-toggle"]');
    await page.waitForSelector('[data-testid="watch-toggle"][aria-pressed="false"]');
    const [row] = await db().select().from(subscriptions).where(and(eq(subscriptions.sampleId, sampleId), eq(subscriptions.userId, lab.people.analyst.id)));
    expect(row).toBeUndefined();
    await context.close();
  });

  it("the unsubscribe link works without signing in, and only after the click", async () => {
    const context = await browser.newContext({ viewport: { width: 1100, height: 800 } });
    const page = await context.newPage();
    const link = linkIn(ownerMail.text, "/unsubscribe/");
    await page.goto(link);
    await page.waitForSelector(`h1:has-text("Stop e-mails about ${sampleName}?")`);
    const watching = () => db().select().from(subscriptions).where(and(eq(subscriptions.sampleId, sampleId), eq(subscriptions.userId, lab.people.owner.id)));
    expect(await watching()).toHaveLength(1);
    await shot(page, "unsubscribe");
    await page.click('[data-testid="confirm-unsubscribe"]');
    await page.waitForSelector("text=you will get no more e-mails about this sample");
    expect(await watching()).toHaveLength(0);
    await page.goto(`${APP_URL}/unsubscribe/not-a-token`);
    await page.waitForSelector("h1:has-text('This link is not valid')");
    await context.close();
  });
});
