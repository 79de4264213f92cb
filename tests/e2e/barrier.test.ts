import type { Browser } from "playwright-core";
import { desc, eq } from "drizzle-orm";
import { strToU8, zipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { analysisRuns, spectra } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { approachToCsv, decayConstant_per_nm, makeApproachCurve } from "@/lib/spectra";
import { APP_URL, launch, shot, signedIn } from "../support/browser";
import { makeLab, TEST_PASSWORD, type LabFixture, system } from "../support/fixtures";
import { sweepSample, uploadFile } from "../support/pipeline";

/**
 * I(z) curves as people see them: the session's I(z) page (curves, fits, points left out, κ and
 * φ_ap), and the sample's field model switched to κ from those curves, re-estimated in the
 * background, with the critical-field card naming its κ. Curves and sweep from the project's
 * physical models: tip 4.7 eV, sample 3.9 eV, so κ = √(2m_e·4.3 eV)/ħ = 10.62 nm⁻¹.
 */
let browser: Browser;
let lab: LabFixture;
let sampleId: string;
let sessionId: string;

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Barrier pages");
  let ids: string[];
  ({ sampleId, ids } = await sweepSample(lab.ctx("owner"), { name: "GX-κ bilayer", n: 12, seed: 33 }));
  [{ sessionId }] = await db().select({ sessionId: spectra.sessionId }).from(spectra).where(eq(spectra.id, ids[0]));
  const kappa = decayConstant_per_nm(4.3);
  const meta = { setpoint_bias_V: 0.1, setpoint_current_A: 1e-10 };
  const zip = zipSync({
    "iz-1.csv": strToU8(approachToCsv({ ...makeApproachCurve({ kappa_per_nm: kappa, seed: 5, retraction: true }), meta })),
    "iz-2.csv": strToU8(
      approachToCsv({ ...makeApproachCurve({ kappa_per_nm: kappa, seed: 6, contact: { at_nm: -0.22, conductance_G0: 0.5 } }), meta }),
    ),
  });
  const { id } = await uploadFile(lab.ctx("microscopist"), sessionId, "iz.zip", zip);
  await processUpload({ ctx: system(), input: { uploadId: id } });
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await stopBoss();
  await closeDb();
});

describe("I(z) curves in the browser", () => {
  it("the session links to its I(z) page; switching the field model to κ from them (all, then one ticked) re-estimates and the card says so", async () => {
    const { context, page } = await signedIn(browser, lab.people.analyst.email, TEST_PASSWORD, lab.lab.slug);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/sessions/${sessionId}`);
    await page.click("text=I(z) curves (2)");
    await page.waitForSelector('[data-testid="approach-plot"] .main-svg');
    expect(await page.locator('[data-testid="approach-plot"]').count()).toBe(2);
    expect(await page.textContent('[data-testid="barrier-summary"]')).toMatch(/κ = 10\.6\d ± 0\.\d\d nm⁻¹ · φap = 4\.[23]\d ± 0\.\d\d eV/);
    expect(await page.textContent("main")).toMatch(/points past a jump to point contact left out/);
    await shot(page, "barrier-session");
    // The tips page sums κ up per tip and sample.
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/tips`);
    expect(await page.textContent('[data-testid="tip-kappa"]')).toMatch(/^GX-κ bilayer: κ = 10\.6\d ± 0\.\d\d nm⁻¹, φap = 4\.[23]\d eV \(2 I\(z\)\)$/);
    await shot(page, "barrier-tips");

    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    await page.waitForSelector('[data-testid="phase-plot"] .main-svg');
    const [runBefore] = await db().select().from(analysisRuns).where(eq(analysisRuns.sampleId, sampleId)).orderBy(desc(analysisRuns.createdAt)).limit(1);
    await page.selectOption('form[aria-label="Field model"] select[name="decayConstantSource"]', "curves");
    await page.click("text=/Save field model as v\\d/");
    const deadline = Date.now() + 60_000;
    for (;;) {
      const [run] = await db().select().from(analysisRuns).where(eq(analysisRuns.sampleId, sampleId)).orderBy(desc(analysisRuns.createdAt)).limit(1);
      if (run && run.id !== runBefore?.id && run.status === "done") break;
      if (Date.now() > deadline) throw new Error(`re-analysis still ${run?.status}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    await page.waitForFunction(() => /measured on 2 I\(z\) curves/.test(document.querySelector('[data-testid="crossing-kappa-source"]')?.textContent ?? ""), null, { timeout: 5000 });
    expect(await page.textContent('[data-testid="kappa-source"]')).toMatch(/^κ = 10\.6\d ± 0\.\d\d nm⁻¹ measured on 2 I\(z\) curves of the session of 2026-11-22/);
    await shot(page, "barrier-sample-after");

    // A set chosen by hand: only the curve without the jump to contact (iz-1.csv).
    const [runCurves] = await db().select().from(analysisRuns).where(eq(analysisRuns.sampleId, sampleId)).orderBy(desc(analysisRuns.createdAt)).limit(1);
    const form = page.locator('form[aria-label="Field model"]');
    await form.locator('select[name="curveChoice"]').selectOption("set:");
    await form.locator("label", { hasText: "iz-1.csv" }).locator('input[type="checkbox"]').check();
    expect(await form.locator('input[name="curveIds"]:checked').count()).toBe(1);
    await shot(page, "barrier-sample-set");
    await page.click("text=/Save field model as v\\d/");
    for (;;) {
      const [run] = await db().select().from(analysisRuns).where(eq(analysisRuns.sampleId, sampleId)).orderBy(desc(analysisRuns.createdAt)).limit(1);
      if (run && run.id !== runCurves.id && run.status === "done") break;
      if (Date.now() > deadline + 60_000) throw new Error(`re-analysis still ${run?.status}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    await page.waitForFunction(() => /measured on 1 I\(z\) curve chosen by hand/.test(document.querySelector('[data-testid="crossing-kappa-source"]')?.textContent ?? ""), null, { timeout: 5000 });
    // The form shows the set it was saved with.
    await page.waitForFunction(() => document.querySelectorAll('form[aria-label="Field model"] input[name="curveIds"]:checked').length === 1);
    expect(await form.locator('select[name="curveChoice"]').inputValue()).toBe("set:");
    await context.close();
  });
});
