import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { builtPlotly, PLOTLY_TRACES, plotlyVendorFile, vendorPlotly } from "@/scripts/plotly-vendor";

/**
 * The plotting library's build step, as `next build` runs it from a fresh clone: the file appears
 * under public/vendor/ with a content-keyed name, holds the trace types we draw, and carries the
 * changes to its dependencies (the build throws if one of them no longer matches).
 */
describe("vendorPlotly", () => {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), "bandcross-vendor-"));
  afterAll(() => fs.rmSync(root, { recursive: true, force: true }));

  it("builds the library once, under a name keyed by what decides its content", async () => {
    const stale = path.join(root, "public", "vendor", "plotly-0.0.0-old.min.js");
    fs.mkdirSync(path.dirname(stale), { recursive: true });
    fs.writeFileSync(stale, "old build");
    const src = await vendorPlotly(root);
    const { file } = plotlyVendorFile(root);
    expect(src).toMatch(/^\/vendor\/plotly-\d+\.\d+\.\d+-[0-9a-f]{10}\.min\.js$/);
    expect(path.basename(file)).toBe(path.basename(src));
    const text = fs.readFileSync(file, "utf8");
    // A browser script that defines the global the pages read.
    expect(text).toMatch(/^(\/\*[\s\S]*?\*\/\s*)*var Plotly=/);
    // The trace types beyond the core, by the names Plotly registers them under.
    for (const t of PLOTLY_TRACES) expect(text).toContain(`"${t}"`);
    // The focus canvas made on the first selection (patches 2 and 3): property names survive minifying.
    expect(text.split("_focusReglWanted").length - 1).toBe(2);
    // The CSP-safe WebGL scatter: every draw procedure Plotly generated ahead of time is in the file,
    // under the SHA-256 key regl looks it up by (plotly.js's own list, src/traces/scattergl/regl_precompiled.js).
    const precompiled = fs.readFileSync(path.resolve("node_modules/plotly.js/src/traces/scattergl/regl_precompiled.js"), "utf8");
    const keys = [...precompiled.matchAll(/'([0-9a-f]{64})': v\d+/g)].map((m) => m[1]);
    expect(keys.length).toBeGreaterThan(5);
    for (const k of keys) expect(text).toContain(k);
    // Older builds are removed; a second call keeps the file as it is.
    expect(fs.existsSync(stale)).toBe(false);
    const mtime = fs.statSync(file).mtimeMs;
    await vendorPlotly(root);
    expect(fs.statSync(file).mtimeMs).toBe(mtime);
  }, 60_000);

  it("on a server (next start), points at the file the build made and removes nothing", async () => {
    const other = fs.mkdtempSync(path.join(os.tmpdir(), "bandcross-vendor-"));
    try {
      const dir = path.join(other, "public", "vendor");
      fs.mkdirSync(dir, { recursive: true });
      // A build made elsewhere, under another key (say, another esbuild version on the build machine).
      fs.writeFileSync(path.join(dir, "plotly-4.1.1-0123456789.min.js"), "var Plotly={}");
      expect(await builtPlotly(other)).toBe("/vendor/plotly-4.1.1-0123456789.min.js");
      expect(fs.readdirSync(dir)).toEqual(["plotly-4.1.1-0123456789.min.js"]);
    } finally {
      fs.rmSync(other, { recursive: true, force: true });
    }
  });
});
