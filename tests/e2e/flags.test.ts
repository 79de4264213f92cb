import type { Browser } from "playwright-core";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { gapPicks, spectra } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { createTip } from "@/lib/services/tips/createTip";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { makeSweep, spectrumToCsv } from "@/lib/spectra";
import { APP_URL, launch, shot, SHOTS_DIR, signedIn as signedInAs } from "../support/browser";
import { makeLab, TEST_PASSWORD, withSpikeAtZero, type LabFixture, system } from "../support/fixtures";
import { bytesOf, uploadFile } from "../support/pipeline";

/**
 * Quality flags in the browser: a microscopist drops a spectrum with a glitch and a clean one on a
 * session page (the app's own worker processes them); the flag shows in the spectra table and its
 * filter, on the review page with its message (and the "next flagged" key), and ringed and counted
 * under the phase plot; the owner's lab setting then leaves flagged picks out of the fit.
 * Spectra from lib/spectra/synthetic.ts; a glitch is a +3 single-point spike at 0 V (about half the
 * spectrum's maximum), which the picker removes and flags.
 */
let browser: Browser;
let lab: LabFixture;
let sampleId: string;
let dropSessionId: string;

const flaggedCount = async () => (await db().select({ flags: gapPicks.flags }).from(gapPicks).innerJoin(spectra, eq(spectra.id, gapPicks.spectrumId)).where(eq(spectra.sampleId, sampleId))).filter((r) => r.flags.length > 0).length;

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Flags browser");
  const owner = lab.ctx("owner");
  sampleId = (await createSample({ ctx: owner, input: { name: "GX-40 flagged", material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } })).id;
  const tip = await createTip({ ctx: owner, input: { label: "W-fl", material: "W", workFunction_eV: 4.7, workFunctionSigma_eV: 0.1 } });
  // A sweep measured earlier, two of its spectra with a glitch, so the phase plot has a fit.
  const earlier = (await createSession({ ctx: owner, input: { sampleId, tipId: tip.id, label: "approach", date: "2026-11-24", temperature_K: 4.5 } })).id;
  for (const [i, s] of makeSweep({ n: 12, seed: 11 }).spectra.entries()) {
    const { id } = await uploadFile(owner, earlier, `sweep-${String(i).padStart(2, "0")}.csv`, bytesOf(spectrumToCsv(i === 3 || i === 9 ? withSpikeAtZero(s) : s)));
    await processUpload({ ctx: system(), input: { uploadId: id } });
  }
  dropSessionId = (await createSession({ ctx: owner, input: { sampleId, tipId: tip.id, label: "drop", date: "2026-11-25", temperature_K: 4.5 } })).id;
}, 90_000);

afterAll(async () => {
  await browser?.close();
  await stopBoss();
  await closeDb();
});

const signedIn = (email: string) => signedInAs(browser, email, TEST_PASSWORD, lab.lab.slug, { width: 1400, height: 900 });

describe("quality flags in the browser", () => {
  it("a dropped spectrum with a glitch is flagged in the table, its filter, the review page and the phase plot's key", async () => {
    const { context, page } = await signedIn(lab.people.owner.email);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/sessions/${dropSessionId}`);
    await page.waitForSelector('[data-testid="dropzone"]');
    const extra = makeSweep({ n: 12, seed: 12 }).spectra;
    const files = [
      { name: "glitch.csv", text: spectrumToCsv(withSpikeAtZero(extra[6])) },
      { name: "clean.csv", text: spectrumToCsv(extra[1]) },
    ];
    const dt = await page.evaluateHandle((fs) => {
      const d = new DataTransfer();
      for (const f of fs) d.items.add(new File([f.text], f.name, { type: "text/csv" }));
      return d;
    }, files);
    await page.dispatchEvent('[data-testid="dropzone"]', "dragover", { dataTransfer: dt });
    await page.dispatchEvent('[data-testid="dropzone"]', "drop", { dataTransfer: dt });
    await page.waitForFunction(() => document.querySelectorAll('[data-testid="upload-row"][data-status="done"]').length === 2, null, { timeout: 45_000 });
    await page.waitForFunction(() => document.querySelectorAll('[data-testid="spectrum-row"]').length === 2);

    // The Flags column: the glitch's short label, its message as the tooltip; the clean one has none.
    const rowOf = (name: string) => page.locator('[data-testid="spectrum-row"]', { hasText: name });
    await rowOf("glitch.csv").locator('[data-testid="flag-badges"]').waitFor();
    const badge = rowOf("glitch.csv").locator('[data-testid="flag-badges"] span', { hasText: "glitch removed" });
    expect(await badge.getAttribute("title")).toContain("single-point spike replaced before picking, at 0 mV");
    expect(await rowOf("clean.csv").locator('[data-testid="spectrum-flags"]').textContent()).not.toContain("glitch");
    await shot(page, "flags-session-table");

    // The filter asks the server: flagged, not flagged, one flag's code.
    const names = () => page.locator('[data-testid="spectrum-row"] a').allTextContents();
    await page.selectOption('[data-testid="flag-filter"]', "flagged");
    await expect.poll(names).toEqual(["glitch.csv"]);
    await page.selectOption('[data-testid="flag-filter"]', "unflagged");
    await expect.poll(names).toEqual(["clean.csv"]);
    await page.selectOption('[data-testid="flag-filter"]', "glitch");
    await expect.poll(names).toEqual(["glitch.csv"]);

    // The review page: the flag and its message by the pick.
    await Promise.all([page.waitForURL("**/spectra/**"), rowOf("glitch.csv").locator("a").click()]);
    const glitchId = page.url().split("/spectra/")[1];
    const flags = page.locator('[data-testid="pick-flags"]');
    await flags.waitFor();
    expect(await flags.textContent()).toContain("glitch removed");
    expect(await flags.textContent()).toContain("single-point spike replaced before picking, at 0 mV");
    await page.waitForSelector('[data-testid="spectrum-review"] .js-plotly-plot');
    expect(await page.textContent('[data-testid="spectrum-review"]')).toContain("F next flagged");
    await shot(page, "flags-review");

    // F: the next flagged spectrum of the sample, without a page load; every one it visits is flagged.
    const visited = [glitchId];
    const total = await flaggedCount();
    expect(total).toBeGreaterThanOrEqual(3);
    for (let k = 1; k < total; k++) {
      const from = visited[visited.length - 1];
      await page.keyboard.press("f");
      await page.waitForFunction((id) => document.querySelector('[data-testid="spectrum-review"]')?.getAttribute("data-spectrum-id") !== id, from);
      const id = (await page.getAttribute('[data-testid="spectrum-review"]', "data-spectrum-id"))!;
      // Its own data has arrived (not the page's first spectrum standing in while it loads).
      await page.waitForSelector(`[data-testid="spectrum-review"][data-spectrum-id="${id}"][data-shown-id="${id}"] [data-testid="pick-flags"]`);
      visited.push(id);
    }
    // After the last it comes round to the first again: each flagged spectrum once.
    expect(new Set(visited).size).toBe(total);
    expect(page.url()).toContain(visited[visited.length - 1]);
    // The button does the same as the key.
    await page.click('[data-testid="next-flagged"]');
    await page.waitForSelector(`[data-testid="spectrum-review"][data-spectrum-id="${visited[0]}"][data-shown-id="${visited[0]}"]`);

    // The API answers carry them too.
    const spectrum = (await (await page.request.get(`${APP_URL}/api/v1/spectra/${glitchId}?lab=${lab.lab.slug}`)).json()) as { pick: { flags: { code: string; message: string }[] } };
    expect(spectrum.pick.flags.map((f) => f.code)).toContain("glitch");
    const phase = (await (await page.request.get(`${APP_URL}/api/v1/samples/${sampleId}/phase?lab=${lab.lab.slug}`)).json()) as { points: { spectrumId: string; flags: unknown[]; excludedByFlag: boolean }[] };
    expect(phase.points.filter((p) => p.flags.length > 0)).toHaveLength(total);

    await context.close();

    // The phase plot (a fresh browser, as a reader opening it): its still preview rings the flagged
    // points, the plot marks them, the key counts them.
    const reader = await signedIn(lab.people.collaborator.email);
    const view = reader.page;
    let release!: () => void;
    const held = new Promise<void>((r) => (release = r));
    await view.route("**/vendor/plotly-*.min.js", async (route) => {
      await held;
      await route.continue();
    });
    await view.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`, { waitUntil: "commit" });
    const rings = view.locator('[data-testid="phase-preview-rings"] path').first();
    await rings.waitFor({ state: "attached" });
    expect(((await rings.getAttribute("d")) ?? "").split("M").length - 1).toBe(total);
    await view.locator('[data-testid="phase-plot"]').screenshot({ path: `${SHOTS_DIR}/flags-phase-preview.png` });
    release();
    await view.waitForSelector('[data-testid="phase-plot"] .main-svg');
    await view.waitForSelector(".legend >> text=flagged (quality flag)");
    expect(Number(await view.textContent('[data-testid="phase-key-flagged"] dd'))).toBe(total);
    expect(await view.textContent('[data-testid="phase-key-flagged"]')).toContain("ringed: flagged");
    await view.locator('[data-testid="phase-plot"]').screenshot({ path: `${SHOTS_DIR}/flags-phase-plot.png` });
    await reader.context.close();
  });

  it("the owner leaves flagged spectra out of the fit: the samples are refitted and the key counts them as left out", async () => {
    const { context, page } = await signedIn(lab.people.owner.email);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/settings`);
    await page.selectOption('[data-testid="flagged-in-fit-form"] select[name="flaggedInFit"]', "exclude");
    await page.click('[data-testid="flagged-in-fit-form"] button[type="submit"]');
    await page.waitForSelector("text=Every sample is being refitted in the background");
    // The form shows the saved choice, not the one it was opened with.
    await expect.poll(() => page.inputValue('[data-testid="flagged-in-fit-form"] select[name="flaggedInFit"]')).toBe("exclude");
    await page.locator('[data-testid="flagged-in-fit-form"]').scrollIntoViewIfNeeded();
    await shot(page, "flags-lab-setting");
    const total = await flaggedCount();
    // The app's worker refits; the plot refreshes by itself every 10 s, a reload is quicker.
    await expect
      .poll(
        async () => {
          await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
          return (await page.locator('[data-testid="phase-key-flagged-out"] dd').count()) ? Number(await page.textContent('[data-testid="phase-key-flagged-out"] dd')) : 0;
        },
        { timeout: 30_000, interval: 1000 },
      )
      .toBe(total);
    // The points still in the fit (none is excluded by hand here) are the ones the refit used.
    const phase = (await (await page.request.get(`${APP_URL}/api/v1/samples/${sampleId}/phase?lab=${lab.lab.slug}`)).json()) as { points: { excluded: boolean; excludedByFlag: boolean }[] };
    const inFit = phase.points.filter((p) => !p.excluded && !p.excludedByFlag).length;
    expect(inFit).toBe(phase.points.length - total);
    await expect
      .poll(
        async () => {
          await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
          return page.textContent('[data-testid="crossing-summary"]');
        },
        { timeout: 30_000, interval: 1000 },
      )
      .toContain(`${inFit} spectra in the fit`);
    await page.waitForSelector('[data-testid="phase-plot"] .main-svg');
    await page.waitForSelector(".legend >> text=flagged, not in the fit");
    await shot(page, "flags-phase-plot-left-out");
    await page.locator('[data-testid="phase-plot"]').screenshot({ path: `${SHOTS_DIR}/flags-phase-plot-left-out-close.png` });
    await context.close();
  });
});
