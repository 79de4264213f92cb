import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { stopBoss } from "@/lib/jobs/queue";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { createTip } from "@/lib/services/tips/createTip";
import { makeSweep, spectrumToCsv } from "@/lib/spectra";
import { APP_URL, launch, shot, SignInPage } from "../support/browser";
import { makeLab, TEST_PASSWORD, type LabFixture } from "../support/fixtures";

/** A microscopist drops three files on a session page; the app's own worker (started by npm test) processes them. */
let browser: Browser;
let lab: LabFixture;
let sessionId: string;

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Upload browser");
  const owner = lab.ctx("owner");
  const sample = await createSample({ ctx: owner, input: { name: "GX-30", material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } });
  const tip = await createTip({ ctx: owner, input: { label: "W-u", material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: 0.1 } });
  sessionId = (await createSession({ ctx: owner, input: { sampleId: sample.id, tipId: tip.id, label: "drop test", date: "2026-11-23", temperature_K: 4.5 } })).id;
});

afterAll(async () => {
  await browser?.close();
  await stopBoss();
  await closeDb();
});

describe("upload in the browser", () => {
  it("three files dropped on the session page go to storage and are processed; a bad one fails with its message", async () => {
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 } });
    const page = await context.newPage();
    const s = new SignInPage(page);
    await s.open();
    await s.signIn(lab.people.microscopist.email, TEST_PASSWORD);
    await page.waitForURL(`**/labs/${lab.lab.slug}`);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/sessions/${sessionId}`);
    await page.waitForSelector('[data-testid="dropzone"]');

    const sweep = makeSweep({ n: 3, seed: 21 });
    const files = [
      { name: "approach-a.csv", text: spectrumToCsv(sweep.spectra[0]) },
      { name: "approach-b.csv", text: spectrumToCsv(sweep.spectra[2]) },
      { name: "notes.csv", text: "bias (V),dI/dV (a.u.)\n0,1\n0.1,2\n" },
    ];
    // Build a real DataTransfer in the page and drop it on the zone, as a drag from the desktop does.
    const dt = await page.evaluateHandle((fs) => {
      const d = new DataTransfer();
      for (const f of fs) d.items.add(new File([f.text], f.name, { type: "text/csv" }));
      return d;
    }, files);
    await page.dispatchEvent('[data-testid="dropzone"]', "dragover", { dataTransfer: dt });
    await page.dispatchEvent('[data-testid="dropzone"]', "drop", { dataTransfer: dt });

    await page.waitForFunction(() => document.querySelectorAll('[data-testid="upload-row"]').length === 3);
    await page.waitForFunction(
      () => [...document.querySelectorAll('[data-testid="upload-row"]')].every((r) => ["done", "failed"].includes(r.getAttribute("data-status") ?? "")),
      null,
      { timeout: 45_000 },
    );
    const states = await page.$$eval('[data-testid="upload-row"]', (rows) => rows.map((r) => [r.querySelector("span")?.textContent ?? "", r.getAttribute("data-status")]));
    expect(states.filter(([, st]) => st === "done")).toHaveLength(2);
    const failed = await page.textContent('[data-testid="upload-row"][data-status="failed"]');
    expect(failed).toContain("notes.csv");
    expect(failed).toContain("a spectrum needs at least 10");
    // One summary line with true counts and plurals, failures first; the failure leads the list.
    expect(await page.textContent('[data-testid="upload-counts"]')).toBe("3 files: 1 failed, 2 done");
    expect(await page.getAttribute('[data-testid="upload-row"] >> nth=0', "data-status")).toBe("failed");
    expect(await page.textContent('[data-testid="upload-row"][data-status="done"] >> nth=0')).toContain("1 spectrum");
    expect(await page.textContent('[data-testid="upload-row"][data-status="done"] >> nth=0')).not.toContain("1 spectra");
    // A file that cannot be read fails again on a retry: no Retry, and the message says what to do.
    expect(await page.$$('[data-testid="upload-row"][data-status="failed"] button')).toHaveLength(0);
    expect(failed).toContain("Correct the file and upload it again");
    await page.waitForSelector('[data-testid="spectrum-row"]');
    expect(await page.$$('[data-testid="spectrum-row"]')).toHaveLength(2);
    await shot(page, "session-upload");

    // Inline tagging: set the region of the first spectrum.
    await page.click('[data-testid="spectrum-row"] >> nth=0 >> button[aria-label^="Edit Region"]');
    await page.fill('[data-testid="spectrum-row"] >> nth=0 >> input[aria-label="Region"]', "terrace A");
    await page.keyboard.press("Enter");
    await page.waitForSelector('[data-testid="spectrum-row"] >> text=terrace A');

    // A typo in a number cell is refused on the page and changes nothing; a number is saved.
    const current = '[data-testid="spectrum-row"] >> nth=0 >> button[aria-label^="Edit I set"]';
    const before = (await page.textContent(current))?.trim();
    await page.click(current);
    await page.fill('[data-testid="spectrum-row"] >> nth=0 >> input[aria-label="I set (pA)"]', "fifty");
    await page.keyboard.press("Enter");
    await page.waitForSelector('text=Not saved: setpoint current "fifty" is not a number (in pA).');
    expect((await page.textContent(current))?.trim()).toBe(before);
    await page.click(current);
    await page.fill('[data-testid="spectrum-row"] >> nth=0 >> input[aria-label="I set (pA)"]', "75,5");
    await page.keyboard.press("Enter");
    await page.waitForFunction((sel) => document.querySelector(sel)?.textContent?.trim() === "75.5", '[data-testid="spectrum-row"]:first-of-type button[aria-label^="Edit I set"]');
    await context.close();
  });
});
