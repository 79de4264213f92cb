import type { Browser, Page } from "playwright-core";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { gapPicks, pickHistory, spectra } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { APP_URL, launch, shot, signedIn as signedInAs } from "../support/browser";
import { makeLab, TEST_PASSWORD, type LabFixture } from "../support/fixtures";
import { sweepSample } from "../support/pipeline";

/** The review page's band-edge boxes, reason box and keys, in chromium against the built app. */
let browser: Browser;
let lab: LabFixture;
let sampleId: string;
let ids: string[];

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Review edges");
  // Every spectrum of this sweep has both edges.
  ({ sampleId, ids } = await sweepSample(lab.ctx("owner"), { name: "GX-50", n: 10, seed: 17 }));
}, 90_000);

afterAll(async () => {
  await browser?.close();
  await stopBoss();
  await closeDb();
});

const signedIn = (email: string, more?: { hasTouch?: boolean; isMobile?: boolean }) => signedInAs(browser, email, TEST_PASSWORD, lab.lab.slug, { width: 1400, height: 900 }, more);
const mvOf = async (page: Page, testid: string) => parseFloat((await page.textContent(`[data-testid="${testid}"]`))!);

async function openReview(page: Page, id: string) {
  await page.goto(`${APP_URL}/labs/${lab.lab.slug}/spectra/${id}`);
  await page.waitForSelector('[data-testid="spectrum-review"] .js-plotly-plot .shapelayer path');
}

describe("band-edge boxes", () => {
  it("are free text while typing, read a decimal comma on Enter, refuse text and values outside the bias range in words, and never give the plot NaN", async () => {
    const { context, page } = await signedIn(lab.people.analyst.email);
    const problems: string[] = [];
    page.on("console", (m) => {
      if (m.type() === "error" || /NaN/.test(m.text())) problems.push(m.text());
    });
    page.on("pageerror", (e) => problems.push(e.message));
    await openReview(page, ids[2]);
    const box = '[data-testid="vb-input"]';
    const vb0 = await mvOf(page, "vb-edge");
    await page.click(box);
    await page.keyboard.press("Control+A");
    await page.keyboard.press("Backspace");
    expect(await page.inputValue(box)).toBe("");
    await page.keyboard.type("6");
    expect(await page.inputValue(box)).toBe("6");
    await page.keyboard.type(".");
    expect(await page.inputValue(box)).toBe("6.");
    await page.keyboard.press("Backspace");
    await page.keyboard.press("Backspace");
    await page.keyboard.type("-");
    expect(await page.inputValue(box)).toBe("-");
    await shot(page, "review-typing-edge");
    // Nothing is committed while typing: the edge on the page is still the pick's.
    expect(await mvOf(page, "vb-edge")).toBe(vb0);

    await page.keyboard.type("abc");
    await page.keyboard.press("Enter");
    expect(await page.textContent('[data-testid="vb-error"]')).toContain("not a number");
    expect(await mvOf(page, "vb-edge")).toBe(vb0);
    expect(await page.isDisabled('[data-testid="save-correction"]')).toBe(true);

    await page.fill(box, "9999");
    await page.keyboard.press("Enter");
    expect(await page.textContent('[data-testid="vb-error"]')).toMatch(/outside this spectrum's bias range \(-?\d+ to \d+ mV\)/);
    expect(await mvOf(page, "vb-edge")).toBe(vb0);

    await page.fill(box, "-60,5");
    await page.keyboard.press("Enter");
    expect(await page.textContent('[data-testid="vb-edge"]')).toBe("-60.5 mV");
    expect(await page.inputValue(box)).toBe("-60.5");
    expect(await page.$('[data-testid="vb-error"]')).toBeNull();
    // Committed on blur too.
    await page.fill('[data-testid="cb-input"]', "70");
    await page.click('[data-testid="reason-input"]');
    expect(await page.textContent('[data-testid="cb-edge"]')).toBe("70.0 mV");
    const paths = await page.$$eval(".js-plotly-plot .shapelayer path", (els) => els.map((e) => e.getAttribute("d") ?? ""));
    expect(paths.some((d) => d.includes("NaN"))).toBe(false);
    expect(problems.filter((p) => /NaN/.test(p))).toEqual([]);
    await context.close();
  });
});

describe("the reason box", () => {
  it("is empty for the next spectrum and after a save; the last reason is offered as a suggestion, never pre-filled", async () => {
    const { context, page } = await signedIn(lab.people.analyst.email);
    await openReview(page, ids[3]);
    await page.fill('[data-testid="reason-input"]', "tip change at this point");
    await page.click("text=Next →");
    await page.waitForFunction((id) => document.querySelector('[data-testid="spectrum-review"]')?.getAttribute("data-spectrum-id") === id, ids[4]);
    expect(await page.inputValue('[data-testid="reason-input"]')).toBe("");
    // X excludes this spectrum with the default reason, not the text typed for the previous one.
    await page.keyboard.press("x");
    await page.waitForFunction((id) => document.querySelector('[data-testid="spectrum-review"]')?.getAttribute("data-spectrum-id") === id, ids[5]);
    const [excluded] = await db().select().from(gapPicks).where(eq(gapPicks.spectrumId, ids[4]));
    expect(excluded.excluded).toBe(true);
    expect(excluded.excludedReason).toBe("excluded during review");

    await page.fill('[data-testid="vb-input"]', "-55");
    await page.keyboard.press("Enter");
    await page.fill('[data-testid="reason-input"]', "onset hidden by a tip state");
    await page.click('[data-testid="save-correction"]');
    await page.waitForSelector("text=Correction saved");
    expect(await page.inputValue('[data-testid="reason-input"]')).toBe("");
    await page.click("text=Next →");
    await page.waitForFunction((id) => document.querySelector('[data-testid="spectrum-review"]')?.getAttribute("data-spectrum-id") === id, ids[6]);
    expect(await page.inputValue('[data-testid="reason-input"]')).toBe("");
    // Offered, and used only when clicked.
    await page.click('[data-testid="reason-suggestion"] >> text=onset hidden by a tip state');
    expect(await page.inputValue('[data-testid="reason-input"]')).toBe("onset hidden by a tip state");
    await context.close();
  });
});

describe("keyboard review", () => {
  it("moves the selected edge in fine and coarse steps, switches edges, and A records an acceptance the history and the phase key count; the help names these keys", async () => {
    const { context, page } = await signedIn(lab.people.analyst.email);
    await openReview(page, ids[7]);
    // The pick's method in words, not the picker's internal name.
    const badge = (await page.textContent('section[aria-label="Band edges"]'))!;
    expect(badge).toMatch(/auto · (each edge fitted|both edges fitted together)/);
    expect(badge).not.toMatch(/fit-separate|fit-joint/);
    const help = (await page.textContent('[data-testid="review-keys"]'))!;
    for (const words of [", .", "1 mV", "< >", "10 mV", "E", "valence", "conduction", "A accept"]) expect(help).toContain(words);
    const review = '[data-testid="spectrum-review"]';
    expect(await page.getAttribute(review, "data-selected-edge")).toBe("valence");
    const vb0 = await mvOf(page, "vb-edge");
    await page.keyboard.press(".");
    await page.keyboard.press(".");
    expect(await mvOf(page, "vb-edge")).toBeCloseTo(vb0 + 2, 5);
    await page.keyboard.press(">");
    expect(await mvOf(page, "vb-edge")).toBeCloseTo(vb0 + 12, 5);
    await page.keyboard.press("e");
    expect(await page.getAttribute(review, "data-selected-edge")).toBe("conduction");
    const cb0 = await mvOf(page, "cb-edge");
    await page.keyboard.press(",");
    await page.keyboard.press("<");
    expect(await mvOf(page, "cb-edge")).toBeCloseTo(cb0 - 11, 5);
    expect(await mvOf(page, "vb-edge")).toBeCloseTo(vb0 + 12, 5);
    await shot(page, "review-keys");
    // A moved edge is not accepted by A: the analyst saves or discards it first.
    await page.keyboard.press("a");
    await page.waitForSelector("text=Save or discard the moved edge first");
    await page.click("text=Discard");

    const [pick] = await db().select().from(gapPicks).where(eq(gapPicks.spectrumId, ids[7]));
    await page.keyboard.press("a");
    await page.waitForFunction((id) => document.querySelector('[data-testid="spectrum-review"]')?.getAttribute("data-spectrum-id") === id, ids[8]);
    const rows = await db().select().from(pickHistory).where(and(eq(pickHistory.pickId, pick.id), eq(pickHistory.action, "accept")));
    expect(rows).toHaveLength(1);
    expect(rows[0].actorId).toBe(lab.people.analyst.id);
    expect(rows[0].after).toMatchObject({ version: pick.version });
    await page.keyboard.press("ArrowLeft");
    await page.waitForSelector(`[data-testid="pick-history"] >> text=accepted pick v${pick.version}`);

    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    await page.waitForSelector('[data-testid="phase-key"]');
    expect(await page.textContent('[data-testid="phase-key-accepted"]')).toBe("1");
    await context.close();
  });

  it("on a touch screen the keyboard help is not shown", async () => {
    const { context, page } = await signedIn(lab.people.analyst.email, { hasTouch: true, isMobile: true });
    await openReview(page, ids[1]);
    expect(await page.evaluate(() => matchMedia("(pointer: coarse)").matches || matchMedia("(hover: none)").matches)).toBe(true);
    // The help is there for a keyboard, not shown on a touch screen.
    expect(await page.locator('[data-testid="spectrum-review"] >> text=Keys:').count()).toBe(1);
    expect(await page.isVisible('[data-testid="spectrum-review"] >> text=Keys:')).toBe(false);
    expect(await page.isVisible('[data-testid="vb-input"]')).toBe(true);
    await context.close();
  });
});
