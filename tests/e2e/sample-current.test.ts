import type { Browser, Page } from "playwright-core";
import { desc, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { analysisRuns } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { currentCrossing } from "@/lib/services/alerts/currentCrossing";
import { saveFieldModel } from "@/lib/services/analysis/saveFieldModel";
import { APP_URL, launch, shot, signedIn as signedInAs } from "../support/browser";
import { makeLab, TEST_PASSWORD, type LabFixture, system } from "../support/fixtures";
import { sweepSample } from "../support/pipeline";

/**
 * The sample page after a background re-analysis: every card and the Confirm action follow the
 * new fit without a reload, within 2 s of the job's end, and a stale confirmation is refused.
 * The sweep is the physical model's (critical field near 0.98 V/nm at a 0.25 nm contact distance).
 */
let browser: Browser;
let lab: LabFixture;
let sampleId: string;

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Current sample page");
  ({ sampleId } = await sweepSample(lab.ctx("owner"), {
    name: "GX-40 bilayer",
    n: 20,
    seed: 31,
    sampleWorkFunctionSigma_eV: 0.01,
    tipWorkFunctionSigma_eV: 0.01,
    before: (id) => saveFieldModel({ ctx: lab.ctx("analyst"), input: { sampleId: id, model: { contactDistance_nm: 0.25, contactDistanceSigma_nm: 0.005 } } }),
  }));
  // The save in setup queued a run that the app's worker finishes; the test starts after it.
  await waitForLatestRunDone();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await stopBoss();
  await closeDb();
});

/** Waits until the sample's newest re-analysis run is done; resolves when the database says so. */
async function waitForLatestRunDone(notId?: string) {
  const deadline = Date.now() + 60_000;
  for (;;) {
    const [run] = await db().select().from(analysisRuns).where(eq(analysisRuns.sampleId, sampleId)).orderBy(desc(analysisRuns.createdAt)).limit(1);
    if (run && run.id !== notId && run.status === "done") return run;
    if (Date.now() > deadline) throw new Error(`re-analysis still ${run?.status}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** What each card of the sample page says right now. */
async function readCards(page: Page) {
  return page.evaluate(() => {
    const text = (sel: string) => document.querySelector(sel)?.textContent?.replace(/\s+/g, " ").trim() ?? null;
    const fieldCard = text('[data-testid="field-assumptions"]') ?? "";
    const label = [...document.querySelectorAll('[data-testid="phase-plot"] .annotation-text')].map((e) => e.textContent ?? "").find((t) => /=\s*[\d.]+ V\/nm/.test(t)) ?? "";
    const confirm = document.querySelector('[data-testid="confirm-crossing"]');
    return {
      criticalField: (text('[data-testid="critical-field"]') ?? "").match(/[\d.]+/)?.[0] ?? null,
      crossingVersions: text('[data-testid="crossing-versions"]'),
      fieldCardVersions: fieldCard.match(/Field model v\d+, extraction settings v\d+/)?.[0] ?? null,
      contactDistance: fieldCard.match(/contact distance d_c = ([\d.]+ ± [\d.]+ nm)/)?.[1] ?? null,
      phaseLabel: label.match(/([\d.]+) V\/nm/)?.[1] ?? null,
      confirmLabel: confirm?.textContent?.match(/Confirm ([\d.]+) V\/nm/)?.[1] ?? null,
      confirmCrossingId: confirm?.getAttribute("data-crossing-id") ?? null,
      progressShown: Boolean(document.querySelector('[data-testid="reanalysis-progress"]')),
    };
  });
}

describe("the sample page stays current", () => {
  it("after a new field model's re-analysis every card and Confirm show the new fit within 2 s, without a reload; a stale Confirm is refused", async () => {
    const { context, page } = await signedInAs(browser, lab.people.analyst.email, TEST_PASSWORD, lab.lab.slug, { width: 1400, height: 1000 });
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    await page.waitForSelector('[data-testid="phase-plot"] .main-svg');
    await page.waitForSelector('[data-testid="confirm-crossing"]');
    const before = (await currentCrossing({ ctx: system(), input: { sampleId: sampleId } }))!;
    expect(before.state).toBe("crossed");
    expect((await readCards(page)).criticalField).toBe(before.fieldVPerNm!.toFixed(3));
    const [runBefore] = await db().select().from(analysisRuns).where(eq(analysisRuns.sampleId, sampleId)).orderBy(desc(analysisRuns.createdAt)).limit(1);
    // A marker that a reload would lose.
    await page.evaluate(() => ((window as unknown as { sameDocument: boolean }).sameDocument = true));

    await page.fill('form[aria-label="Field model"] input[name="contactDistance_nm"]', "0,35");
    await page.click("text=Save field model as v3");
    const run = await waitForLatestRunDone(runBefore.id);
    const ended = Date.now();
    const after = (await currentCrossing({ ctx: system(), input: { sampleId: sampleId } }))!;
    expect(after.id).not.toBe(before.id);
    const want = after.fieldVPerNm!.toFixed(3);
    expect(want).not.toBe(before.fieldVPerNm!.toFixed(3));
    const expected = {
      criticalField: want,
      crossingVersions: "fitted with extraction settings v1, field model v3",
      fieldCardVersions: "Field model v3, extraction settings v1",
      contactDistance: "0.35 ± 0.005 nm",
      phaseLabel: want,
      confirmLabel: want,
      confirmCrossingId: after.id,
      progressShown: false,
    };
    let cards = await readCards(page);
    while (JSON.stringify(cards) !== JSON.stringify(expected) && Date.now() - ended < 2000) {
      await new Promise((r) => setTimeout(r, 100));
      cards = await readCards(page);
    }
    expect(cards).toEqual(expected);
    // The save's "being re-analysed" has given way to the finished line.
    expect(await page.textContent('[data-testid="settings-editors"]')).not.toContain("being re-analysed");
    expect(run.done).toBe(run.total);
    expect(await page.evaluate(() => (window as unknown as { sameDocument?: boolean }).sameDocument)).toBe(true);
    await shot(page, "sample-after-field-model");
    // The model comparison is a number with its meaning, never "> 100" or a bare value.
    expect(await page.textContent('[data-testid="delta-bic"]')).toMatch(/^ΔBIC = −?[\d,]+(\.\d)?: (strong|some) preference for (closing and reopening|a straight line)/);

    // The old crossing cannot be confirmed: 409, and the message names the current value.
    const api = `${APP_URL}/api/v1/samples/${sampleId}/crossing/confirm?lab=${lab.lab.slug}`;
    const stale = await page.request.post(api, { data: { crossingId: before.id, field_V_per_nm: before.fieldVPerNm } });
    expect(stale.status()).toBe(409);
    expect((await stale.json()).error.message).toContain(`${want} V/nm`);
    // Nor the current row with another value than it has.
    const wrongValue = await page.request.post(api, { data: { crossingId: after.id, field_V_per_nm: before.fieldVPerNm } });
    expect(wrongValue.status()).toBe(409);

    // Confirm on the page confirms the crossing it shows.
    await page.click('[data-testid="confirm-crossing"]');
    await page.waitForSelector('[data-testid="crossing-event-confirmed"]');
    const confirmed = (await currentCrossing({ ctx: system(), input: { sampleId: sampleId } }))!;
    expect(confirmed.id).toBe(after.id);
    expect(confirmed.status).toBe("confirmed");
    await page.waitForSelector('[data-testid="crossing-summary"] >> text=confirmed by an analyst');
    await context.close();
  });
});
