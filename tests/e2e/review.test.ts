import type { Browser, Page } from "playwright-core";
import { and, asc, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { gapPicks, spectra } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { tagSpectra } from "@/lib/services/spectra/tagSpectra";
import { APP_URL, launch, shot, SHOTS_DIR, SignInPage, signedIn as signedInAs } from "../support/browser";
import { makeLab, TEST_PASSWORD, type LabFixture } from "../support/fixtures";
import { gridSample, sweepSample } from "../support/pipeline";

let browser: Browser;
let lab: LabFixture;
let sampleId: string;
let ids: string[];

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Review browser");
  ({ sampleId, ids } = await sweepSample(lab.ctx("owner"), { name: "GX-20 bilayer", n: 14, seed: 11 }));
}, 90_000);

afterAll(async () => {
  await browser?.close();
  await stopBoss();
  await closeDb();
});

const signedIn = (email: string, options?: { serviceWorkers?: "allow" | "block" }) => signedInAs(browser, email, TEST_PASSWORD, lab.lab.slug, { width: 1400, height: 900 }, options);

/** Drags the n-th editable edge line (0 = valence, 1 = conduction) of the review plot by dx pixels. */
async function dragEdge(page: Page, n: number, dx: number) {
  await page.waitForSelector(".js-plotly-plot .shapelayer path");
  const boxes = await page.$$eval(".js-plotly-plot .shapelayer path", (els) =>
    els.map((el) => {
      const r = el.getBoundingClientRect();
      return { x: r.x + r.width / 2, y: r.y + r.height / 2, w: r.width, h: r.height, grabbable: getComputedStyle(el).pointerEvents !== "none" };
    }),
  );
  // Plotly draws each editable shape twice: the visible line and an invisible handle that takes
  // the pointer. The edge handles are the tall, thin grabbable ones (floor and threshold are flat).
  const edges = boxes.filter((b) => b.grabbable && b.h > 100 && b.w < 12).sort((a, b) => a.x - b.x);
  const e = edges[n];
  await page.mouse.move(e.x, e.y);
  await page.mouse.down();
  await page.mouse.move(e.x + dx / 2, e.y, { steps: 4 });
  await page.mouse.move(e.x + dx, e.y, { steps: 4 });
  await page.mouse.up();
}

describe("review in the browser", () => {
  it("an analyst drags a band edge, saves with a reason, and the phase plot and critical field update", async () => {
    const { context, page } = await signedIn(lab.people.analyst.email);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    await page.waitForSelector('[data-testid="phase-plot"] .js-plotly-plot');
    const before = await page.textContent('[data-testid="critical-field"]');
    const corrected = async () => Number(await page.textContent('[data-testid="phase-key"] div:nth-child(2) dd'));
    const correctedBefore = await corrected();
    await shot(page, "phase-plot");
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/spectra/${ids[1]}`);
    await page.waitForSelector('[data-testid="spectrum-review"] .js-plotly-plot');
    const cb0 = await page.textContent('[data-testid="cb-edge"]');
    await dragEdge(page, 1, 60);
    await page.waitForFunction((old) => document.querySelector('[data-testid="cb-edge"]')?.textContent !== old, cb0);
    const cb1 = await page.textContent('[data-testid="cb-edge"]');
    expect(parseFloat(cb1!)).toBeGreaterThan(parseFloat(cb0!));
    await page.click('[data-testid="save-correction"]');
    await page.waitForSelector("text=Give a reason for the correction");
    await page.fill('[data-testid="reason-input"]', "edge set by eye: broad onset");
    await page.click('[data-testid="save-correction"]');
    await page.waitForSelector("text=Correction saved");
    await page.waitForSelector('[data-testid="pick-history"] >> text=edge set by eye');
    await shot(page, "review");
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    await page.waitForSelector('[data-testid="phase-plot"] .js-plotly-plot');
    await page.waitForSelector(".legend >> text=corrected");
    expect(await corrected()).toBe(correctedBefore + 1);
    const after = await page.textContent('[data-testid="critical-field"]');
    expect(after).not.toBe(before);
    await context.close();
  });

  it("a second analyst's stale save gets the conflict message and keeps their edit", async () => {
    const one = await signedIn(lab.people.analyst.email);
    const two = await signedIn(lab.people.owner.email);
    for (const p of [one.page, two.page]) {
      await p.goto(`${APP_URL}/labs/${lab.lab.slug}/spectra/${ids[4]}`);
      await p.waitForSelector('[data-testid="vb-input"]');
    }
    await one.page.fill('[data-testid="vb-input"]', "-60");
    await one.page.fill('[data-testid="reason-input"]', "first look");
    await one.page.click('[data-testid="save-correction"]');
    await one.page.waitForSelector("text=Correction saved");
    await two.page.fill('[data-testid="vb-input"]', "-45");
    await two.page.fill('[data-testid="reason-input"]', "second look");
    await two.page.click('[data-testid="save-correction"]');
    await two.page.waitForSelector('[data-testid="conflict"]');
    expect(await two.page.textContent('[data-testid="conflict"]')).toContain(lab.people.analyst.name);
    expect(await two.page.inputValue('[data-testid="vb-input"]')).toBe("-45.0");
    await shot(two.page, "review-conflict");
    await one.context.close();
    await two.context.close();
  });

  it("keyboard review moves to the next spectrum without a page load", async () => {
    const { context, page } = await signedIn(lab.people.analyst.email);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/spectra/${ids[0]}`);
    await page.waitForSelector('[data-testid="review-position"] >> text=1 of 14');
    await page.keyboard.press("ArrowRight");
    await page.waitForSelector('[data-testid="review-position"] >> text=2 of 14');
    expect(page.url()).toContain(ids[1]);
    await page.keyboard.press("x");
    await page.waitForSelector('[data-testid="review-position"] >> text=3 of 14');
    const [pick] = await db().select().from(gapPicks).where(eq(gapPicks.spectrumId, ids[1]));
    expect(pick.excluded).toBe(true);
    expect(pick.excludedReason).toBe("excluded during review");
    await context.close();
  });

  it("a collaborator sees no edit controls and a direct PATCH is refused", async () => {
    const { context, page } = await signedIn(lab.people.collaborator.email);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/spectra/${ids[5]}`);
    await page.waitForSelector('[data-testid="spectrum-review"] .js-plotly-plot');
    expect(await page.$('[data-testid="save-correction"]')).toBeNull();
    expect(await page.$('[data-testid="toggle-exclude"]')).toBeNull();
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    // The settings are facts to read, not a form: no inputs, no save buttons.
    const facts = await page.waitForSelector('[data-testid="settings-read-only"]');
    expect(await facts.textContent()).toContain("Savitzky–Golay");
    expect(await page.$('[data-testid="settings-editors"]')).toBeNull();
    expect(await page.$("text=Save settings as")).toBeNull();
    await shot(page, "sample-collaborator");
    const res = await page.request.patch(`${APP_URL}/api/v1/spectra/${ids[5]}/pick`, { headers: { "x-bandcross-lab": lab.lab.slug }, data: { vbEdge_V: -0.05, cbEdge_V: 0.05, reason: "sneaky", version: 1 } });
    expect(res.status()).toBe(403);
    await context.close();
  });

  it("an export downloads and parses", async () => {
    const { context, page } = await signedIn(lab.people.collaborator.email);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    const [download] = await Promise.all([page.waitForEvent("download"), page.click("text=Phase data (CSV)")]);
    const path = await download.path();
    const fs = await import("node:fs");
    const lines = fs.readFileSync(path!, "utf8").trim().split("\r\n");
    expect(lines[0].split(",")).toEqual(expect.arrayContaining(["spectrum_id", "field_V_per_nm", "gap_eV", "raw_sha256"]));
    expect(lines).toHaveLength(15);
    const json = await page.request.get(`${APP_URL}/api/v1/samples/${sampleId}/export?format=json&lab=${lab.lab.slug}`);
    const body = (await json.json()) as { points: unknown[]; crossing: { state: string } };
    expect(body.points).toHaveLength(14);
    expect(body.crossing.state).toBe("crossed");
    await context.close();
  });
  it("the phase plot's still preview stands in until the plotting library has drawn, and the figure downloads as a PNG", async () => {
    const { context, page } = await signedIn(lab.people.collaborator.email);
    // Hold the plotting library back, as a slow first download or compile would.
    let release!: () => void;
    const held = new Promise<void>((r) => (release = r));
    await page.route("**/vendor/plotly-*.min.js", async (route) => {
      await held;
      await route.continue();
    });
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`, { waitUntil: "commit" });
    const preview = page.locator('[data-testid="phase-preview"]');
    await preview.waitFor();
    // One dot per spectrum (the sweep has no excluded ones), drawn from the page's HTML alone.
    const dots = await preview.locator("path[stroke-linecap=round]").evaluateAll((els) => els.map((e) => (e.getAttribute("d") ?? "").split("M").length - 1).reduce((a, b) => a + b, 0));
    expect(dots).toBe(14);
    expect(await preview.textContent()).toContain("estimated field E (V/nm)");
    expect(await page.locator('[data-testid="phase-plot"] .main-svg').count()).toBe(0);
    await shot(page, "phase-preview");
    release();
    await page.waitForSelector('[data-testid="phase-plot"] .main-svg');
    await expect.poll(() => preview.count()).toBe(0);
    const [download] = await Promise.all([page.waitForEvent("download"), page.click('[data-testid="phase-plot"] button:has-text("PNG")')]);
    const fs = await import("node:fs");
    const png = fs.readFileSync((await download.path())!);
    // PNG signature and IHDR size (ISO/IEC 15948): 1200 × 800 at scale 2.
    expect(png.subarray(1, 4).toString("latin1")).toBe("PNG");
    expect([png.readUInt32BE(16), png.readUInt32BE(20)]).toEqual([2400, 1600]);
    // The plot's own camera button writes the same kind of file, at twice the plot's size on screen.
    const graph = page.locator('[data-testid="phase-plot"] .js-plotly-plot');
    await graph.hover();
    const size = await graph.evaluate((el) => [el.clientWidth, el.clientHeight]);
    const [camera] = await Promise.all([page.waitForEvent("download"), graph.locator('[data-title="Download the figure as PNG"]').click()]);
    expect(camera.suggestedFilename()).toBe("gx-20-bilayer-phase.png");
    const cam = fs.readFileSync((await camera.path())!);
    expect([cam.readUInt32BE(16), cam.readUInt32BE(20)]).toEqual([2 * size[0], 2 * size[1]]);
    // The figure follows its box: a window of another width redraws it at the box's new width.
    const widths = () => graph.evaluate((el) => [el.parentElement!.clientWidth, Number(el.querySelector(".main-svg")!.getAttribute("width"))]);
    const [boxBefore, svgBefore] = await widths();
    expect(Math.abs(svgBefore - boxBefore)).toBeLessThan(1);
    await page.setViewportSize({ width: 640, height: 900 });
    await expect.poll(async () => { const [b, w] = await widths(); return b !== boxBefore && Math.abs(w - b) < 1; }).toBe(true);
    await context.close();
  });
  it("a plotting library that fails to download gets a message and a retry that draws the plot", async () => {
    // A browser without the script worker's copy: the library comes from the network, which fails.
    const { context, page } = await signedIn(lab.people.analyst.email, { serviceWorkers: "block" });
    // Every address of the library, retries (with a query) included.
    const library = /\/vendor\/plotly-[^/?]*\.min\.js(\?.*)?$/;
    await page.route(library, (route) => route.abort());
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    const alert = page.locator('[data-testid="phase-plot"] [role="alert"]');
    await alert.waitFor();
    expect(await alert.textContent()).toContain("The plotting library could not be loaded");
    await shot(page, "phase-plot-library-failed");
    await page.unroute(library);
    await alert.locator("button", { hasText: "Retry" }).click();
    await page.waitForSelector('[data-testid="phase-plot"] .main-svg');
    expect(await alert.count()).toBe(0);
    await context.close();
  });

  it("the script worker installs on the first page and serves the plotting library from its cache", async () => {
    const { context, page } = await signedIn(lab.people.collaborator.email);
    // The lab page registered it after loading; once active it holds the library and the build's chunks.
    await page.evaluate(() => navigator.serviceWorker.ready);
    const listed = await page.evaluate(async () => {
      const names = await caches.keys();
      const mine = names.filter((n) => n.startsWith("bandcross-scripts:"));
      const keys = mine.length ? (await (await caches.open(mine[0])).keys()).map((r) => new URL(r.url).pathname) : [];
      return { caches: mine.length, keys };
    });
    expect(listed.caches).toBe(1);
    expect(listed.keys.some((k) => /^\/vendor\/plotly-.*\.min\.js$/.test(k))).toBe(true);
    expect(listed.keys.some((k) => k.startsWith("/_next/static/chunks/"))).toBe(true);
    // The sample page is controlled by it, its library comes from the worker, and the plot draws.
    const library: boolean[] = [];
    page.on("response", (r) => {
      if (r.url().includes("/vendor/plotly-")) library.push(r.fromServiceWorker());
    });
    const doc = await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    await page.waitForSelector('[data-testid="phase-plot"] .main-svg');
    expect(await page.evaluate(() => navigator.serviceWorker.controller?.scriptURL)).toBe(`${APP_URL}/sw.js`);
    // Pages themselves always come from the server.
    expect(doc!.fromServiceWorker()).toBe(false);
    expect(library.length).toBeGreaterThan(0);
    expect(library.every(Boolean)).toBe(true);
    await context.close();
  });

  it("a grid upload shows the gap over position; clicking a cell opens that spectrum; compare overlays two samples", async () => {
    const owner = lab.ctx("owner");
    // A 4 × 4 grid, 0.5 nm apart, whose gap is smallest in one corner.
    const { sampleId: mapId } = await gridSample(owner, "SN-map 4x4");
    const [corner] = await db().select({ id: spectra.id }).from(spectra).where(and(eq(spectra.sampleId, mapId), eq(spectra.xNm, 0), eq(spectra.yNm, 0))).orderBy(asc(spectra.id));
    expect(corner).toBeDefined();

    const { context, page } = await signedIn(lab.people.collaborator.email);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${mapId}`);
    const map = page.locator('[data-testid="gap-map"]');
    expect(await map.textContent()).toContain("grid-4x4.csv · 16 spectra");
    // Plotly draws a heatmap as one image over the cells' area.
    const cells = map.locator(".heatmaplayer image");
    await cells.waitFor();
    await shot(page, "gap-map");
    // The cell at x = 0, y = 0: left column, bottom row (y grows upwards). Plotly takes the point
    // under the pointer from its hover, so the pointer rests there first, until the hover names
    // that cell (the cards beside the map may still move the page as they load).
    // The cards beside the map fetch their data after the page has drawn; a click aimed before
    // they have landed can meet another cell once the page has moved.
    await page.waitForLoadState("networkidle");
    const hover = map.locator(".hoverlayer .hovertext");
    let at: [number, number] = [0, 0];
    await expect
      .poll(async () => {
        await cells.scrollIntoViewIfNeeded();
        const area = (await cells.boundingBox())!;
        at = [area.x + area.width / 8, area.y + (area.height * 7) / 8];
        await page.mouse.move(at[0] + 1, at[1]);
        await page.mouse.move(at[0], at[1]);
        return (await hover.count()) ? await hover.textContent() : "";
      })
      .toContain("x 0.00 nm, y 0.00 nm");
    // The hover names the cell's gap and its file as well as its position.
    const hovered = (await hover.textContent()) ?? "";
    expect(hovered).toMatch(/gap \d+\.\d meV/);
    expect(hovered).toContain("grid-4x4.csv");
    await shot(page, "gap-map-hover");
    await Promise.all([page.waitForURL(`**/spectra/${corner.id}`), page.mouse.click(at[0], at[1])]);
    await page.waitForSelector('[data-testid="spectrum-review"]');

    // Compare: both samples on one field axis, one legend entry each.
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/compare`);
    await page.waitForSelector(".js-plotly-plot .main-svg");
    await expect.poll(() => page.locator(".js-plotly-plot .legendtext").allTextContents()).toEqual(expect.arrayContaining(["GX-20 bilayer", "SN-map 4x4"]));
    await shot(page, "compare");
    await context.close();
  });

  it("on a 412 px phone the mode bar leaves the E_c label clear, and the figure file keeps its whole legend", async () => {
    // Six regions and a few untagged points: on a phone the legend wraps into many rows.
    const regions = ["terrace A", "terrace B", "step edge", "island rim", "domain wall", "vacancy cluster"];
    for (const [k, region] of regions.entries()) await tagSpectra({ ctx: lab.ctx("owner"), input: { ids: [ids[2 + 2 * k], ids[3 + 2 * k]], patch: { region } } });
    const { context, page } = await signedIn(lab.people.analyst.email);
    await page.setViewportSize({ width: 412, height: 915 });
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    const plot = page.locator('[data-testid="phase-plot"]');
    const graph = plot.locator(".js-plotly-plot");
    await plot.locator(".main-svg").first().waitFor();
    await page.waitForSelector('[data-testid="phase-plot"] .legend >> text=no region tagged');
    // The mode bar shows while the pointer is over the figure; the E_c label must stay readable.
    await graph.hover({ position: { x: 40, y: 120 } });
    const boxes = () =>
      page.evaluate(() => {
        const rect = (el: Element | null | undefined) => {
          const r = el?.getBoundingClientRect();
          return r ? { left: r.left, right: r.right, top: r.top, bottom: r.bottom } : null;
        };
        const label = [...document.querySelectorAll('[data-testid="phase-plot"] .annotation-text')].find((e) => /=\s*[\d.]+ V\/nm/.test(e.textContent ?? ""));
        return { label: rect(label), modebar: rect(document.querySelector('[data-testid="phase-plot"] .modebar')) };
      });
    await expect.poll(async () => (await boxes()).label && (await boxes()).modebar).toBeTruthy();
    const { label, modebar } = await boxes();
    const overlap = label!.left < modebar!.right && modebar!.left < label!.right && label!.top < modebar!.bottom && modebar!.top < label!.bottom;
    expect(overlap, JSON.stringify({ label, modebar })).toBe(false);
    await plot.screenshot({ path: `${SHOTS_DIR}/phase-plot-412.png` });
    // The camera button's file, as handed to Plotly: drawn at its size, the legend is whole, below the axis.
    await page.evaluate(() => {
      const P = (window as unknown as { Plotly: { downloadImage: (gd: unknown, o: unknown) => Promise<unknown> } }).Plotly;
      const write = P.downloadImage.bind(P);
      P.downloadImage = (gd, o) => {
        (window as unknown as { figureFile: unknown }).figureFile = { gd, o };
        return write(gd, o);
      };
    });
    const [file] = await Promise.all([page.waitForEvent("download"), graph.locator('[data-title="Download the figure as PNG"]').click()]);
    await file.saveAs(`${SHOTS_DIR}/phase-file-412.png`);
    const drawn = await page.evaluate(async () => {
      const { gd, o } = (window as unknown as { figureFile: { gd: { data: object[]; layout: object }; o: { width: number; height: number } } }).figureFile;
      const P = (window as unknown as { Plotly: { newPlot: (...a: unknown[]) => Promise<unknown> } }).Plotly;
      const div = document.createElement("div");
      document.body.appendChild(div);
      await P.newPlot(div, gd.data, { ...gd.layout, width: o.width, height: o.height }, { staticPlot: true });
      const svg = div.querySelector(".main-svg")!.getBoundingClientRect();
      const legend = div.querySelector(".legend .bg")!.getBoundingClientRect();
      const full = (div as unknown as { _fullLayout: { legend: { _height: number; _effHeight: number } } })._fullLayout.legend;
      const entries = div.querySelectorAll(".legend .traces").length;
      return { height: o.height, top: legend.top - svg.top, bottom: legend.bottom - svg.top, axisTitle: div.querySelector(".xtitle")!.getBoundingClientRect().bottom - svg.top, full: full._height, shown: full._effHeight, entries };
    });
    // 7 region series, the corrected pick, band, fit and field bars.
    expect(drawn.entries).toBeGreaterThanOrEqual(10);
    expect(drawn.shown).toBe(drawn.full);
    expect(drawn.bottom).toBeLessThanOrEqual(drawn.height + 0.5);
    expect(drawn.top).toBeGreaterThanOrEqual(drawn.axisTitle);
    await context.close();
  });
});
