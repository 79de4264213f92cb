import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { stopBoss } from "@/lib/jobs/queue";
import { tagSpectra } from "@/lib/services/spectra/tagSpectra";
import { APP_URL, launch, shot, SHOTS_DIR, signedIn as signedInAs } from "../support/browser";
import { makeLab, TEST_PASSWORD, type LabFixture } from "../support/fixtures";
import { gridSample, sweepSample } from "../support/pipeline";

/**
 * The sample page's main plot, read as a person would: a grid at one setpoint as a histogram of
 * its gaps (not a column of points) pointing to its gap map; the field model's shared error drawn
 * once; on a phone, the legend clear of the x-axis title.
 */
let browser: Browser;
let lab: LabFixture;
let sweepId: string;

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Readable plots");
  const owner = lab.ctx("owner");
  const sweep = await sweepSample(owner, { name: "GX-21 bilayer", n: 14, seed: 11 });
  sweepId = sweep.sampleId;
  // Six regions and a few untagged points: on a phone the legend wraps into many rows.
  const regions = ["terrace A", "terrace B", "step edge", "island rim", "domain wall", "vacancy cluster"];
  for (const [k, region] of regions.entries()) await tagSpectra({ ctx: owner, input: { ids: [sweep.ids[2 + 2 * k], sweep.ids[3 + 2 * k]], patch: { region } } });
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await stopBoss();
  await closeDb();
});

const signedIn = (viewport: { width: number; height: number }) => signedInAs(browser, lab.people.analyst.email, TEST_PASSWORD, lab.lab.slug, viewport);

/** Opens a sample page and waits until the main plot has drawn. */
async function openSample(page: Page, id: string) {
  await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${id}`);
  await page.locator('[data-testid="phase-plot"] .js-plotly-plot .main-svg').first().waitFor();
}

/** The phase plot's shapes as Plotly holds them, and the names in its legend. */
const figureOf = (page: Page) =>
  page.evaluate(() => {
    const gd = document.querySelector('[data-testid="phase-plot"] .js-plotly-plot') as unknown as { layout: { shapes?: { name?: string; path?: string; showlegend?: boolean }[] }; data: { error_x?: unknown }[] };
    return {
      shapes: (gd.layout.shapes ?? []).map((s) => ({ name: s.name ?? "", path: s.path ?? "", showlegend: !!s.showlegend })),
      errorX: gd.data.filter((t) => t.error_x).length,
      legend: [...document.querySelectorAll('[data-testid="phase-plot"] .legendtext')].map((e) => e.textContent ?? ""),
    };
  });

describe("plots people can read", () => {
  it("a grid at one setpoint shows a histogram of its gaps and points to its gap map", async () => {
    const { sampleId } = await gridSample(lab.ctx("owner"), "SN-grid one setpoint");
    const { context, page } = await signedIn({ width: 1400, height: 900 });
    await openSample(page, sampleId);
    const histogram = page.locator('[data-testid="gap-histogram"]');
    await histogram.waitFor();
    const text = (await histogram.textContent()) ?? "";
    // All 16 spectra, at the one field, counted in bins of gap.
    expect(text).toMatch(/16 spectra at E = \d\.\d{3} V\/nm/);
    expect(await page.locator('[data-testid="phase-plot"]').getAttribute("data-view")).toBe("histogram");
    // The bins hold every spectrum once.
    const counted = await page.evaluate(() => {
      const gd = document.querySelector('[data-testid="gap-histogram"] .js-plotly-plot') as unknown as { data: { name?: string; customdata?: [number, number, number][] }[] };
      return gd.data.filter((t) => t.customdata).flatMap((t) => t.customdata!.map((c) => c[2])).reduce((a, b) => a + b, 0);
    });
    expect(counted).toBe(16);
    // No column of points: no phase-plot markers on a field axis.
    expect(await page.locator('[data-testid="phase-plot"] .xtitle').textContent()).toContain("band gap");
    // The pointer to the gap map leads to it.
    const link = histogram.locator('a[href="#gap-map"]');
    expect(await link.count()).toBe(1);
    await link.click();
    await expect.poll(() => page.evaluate(() => location.hash)).toBe("#gap-map");
    const mapTop = await page.locator("#gap-map").evaluate((e) => e.getBoundingClientRect().top);
    expect(Math.abs(mapTop)).toBeLessThan(120);
    await page.evaluate(() => window.scrollTo(0, 0));
    await shot(page, "grid-sample");
    await context.close();
  });

  it("the field model's shared error is one bar with words, not an error bar on every point", async () => {
    const { context, page } = await signedIn({ width: 1400, height: 900 });
    await openSample(page, sweepId);
    expect(await page.locator('[data-testid="phase-plot"]').getAttribute("data-view")).toBe("field");
    const { shapes, errorX, legend } = await figureOf(page);
    expect(errorX).toBe(0);
    const model = shapes.filter((s) => /field model/.test(s.name));
    expect(model).toHaveLength(1);
    // One horizontal stroke (with its two end ticks), not one per point.
    expect(model[0].path.match(/H/g)).toHaveLength(1);
    expect(legend.some((t) => /field model/.test(t))).toBe(true);
    // The key under the plot says what the bar means.
    expect(await page.textContent('[data-testid="phase-key"]')).toMatch(/moves every point together/);
    await page.locator('[data-testid="phase-plot"]').screenshot({ path: `${SHOTS_DIR}/phase-plot-desktop.png` });
    await context.close();
  });

  it("on a 412 px phone the legend sits below the x-axis title, not over it", async () => {
    const { context, page } = await signedIn({ width: 412, height: 915 });
    await openSample(page, sweepId);
    await page.waitForSelector('[data-testid="phase-plot"] .legend >> text=no region tagged');
    const boxes = await page.evaluate(() => {
      const r = (sel: string) => document.querySelector(sel)!.getBoundingClientRect();
      const title = r('[data-testid="phase-plot"] .xtitle');
      const ticks = [...document.querySelectorAll('[data-testid="phase-plot"] .xtick text')].map((e) => e.getBoundingClientRect().bottom);
      const legend = r('[data-testid="phase-plot"] .legend .bg');
      const svg = r('[data-testid="phase-plot"] .main-svg');
      return { titleBottom: title.bottom, ticksBottom: Math.max(...ticks), legendTop: legend.top, legendBottom: legend.bottom, svgBottom: svg.bottom };
    });
    await page.locator('[data-testid="phase-plot"]').screenshot({ path: `${SHOTS_DIR}/phase-plot-412-legend.png` });
    expect(boxes.legendTop, JSON.stringify(boxes)).toBeGreaterThanOrEqual(boxes.titleBottom);
    expect(boxes.legendTop, JSON.stringify(boxes)).toBeGreaterThanOrEqual(boxes.ticksBottom);
    // The whole legend is inside the figure.
    expect(boxes.legendBottom, JSON.stringify(boxes)).toBeLessThanOrEqual(boxes.svgBottom + 0.5);
    await context.close();
  });
});
