import { createHash } from "node:crypto";
import fs from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";

/**
 * The plotting library, as the browser gets it: one classic script holding Plotly's core (with its
 * SVG scatter) and only the trace types Bandcross draws, built from the installed `plotly.js`
 * sources with esbuild and written to `public/vendor/plotly-<version>-<key>.min.js`.
 *
 * Why not the published all-traces bundle: it is 4.8 MB, and on a browser's first visit compiling
 * and running it took 2.6 s of main-thread time in chromium on a 2-core machine; this one is
 * 1.6 MB and took 0.4-0.5 s (measurements in DEVELOPERS.md).
 *
 * The name's key is a hash of everything that decides the file's content (the entry below, the
 * versions of plotly.js and esbuild, the build options), so the address changes exactly when the
 * content can, and the file can be cached for a year. Built once: an existing file is kept.
 */

/** Trace types beyond Plotly's core (which has `scatter`), as `plotly.js/lib/<name>` modules. */
export const PLOTLY_TRACES = ["scattergl", "heatmap"] as const;

// Resolved from the project root (this file is loaded by next.config.ts and by scripts).
const require = createRequire(path.join(process.cwd(), "package.json"));

function versionOf(pkg: string): string {
  return (JSON.parse(fs.readFileSync(require.resolve(`${pkg}/package.json`), "utf8")) as { version: string }).version;
}

function entrySource(): string {
  const traces = PLOTLY_TRACES.map((t) => `require("plotly.js/lib/${t}")`).join(", ");
  return `var Plotly = require("plotly.js/lib/core");\nPlotly.register([${traces}]);\nmodule.exports = Plotly;\n`;
}

const OPTIONS = {
  bundle: true,
  minify: true,
  format: "iife",
  globalName: "Plotly",
  target: "es2020",
  legalComments: "inline",
  // Node's `global` in some of Plotly's dependencies; `buffer` is the browser package of that name.
  define: { global: "window" },
  // Plotly asks for the map library's stylesheet when a map trace registers; there is none here.
  loader: { ".css": "empty" },
} as const;

/** The file's address under the site root, and where it lives on disk, for this checkout. */
export function plotlyVendorFile(root = process.cwd()): { src: string; file: string } {
  const key = createHash("sha256")
    .update(JSON.stringify({ entry: entrySource(), plotly: versionOf("plotly.js"), esbuild: versionOf("esbuild"), options: OPTIONS }))
    .digest("hex")
    .slice(0, 10);
  const name = `plotly-${versionOf("plotly.js")}-${key}.min.js`;
  return { src: `/vendor/${name}`, file: path.join(root, "public", "vendor", name) };
}

/**
 * Builds the file unless it is there, removes the vendor folder's other Plotly builds, and returns
 * its address. Written to a temporary name and renamed, so a server reading the folder never sees
 * half a file (several build workers may run this at once).
 */
export function vendorPlotly(root = process.cwd()): string {
  const { src, file } = plotlyVendorFile(root);
  if (!fs.existsSync(file)) {
    const esbuild = require("esbuild") as typeof import("esbuild");
    fs.mkdirSync(path.dirname(file), { recursive: true });
    const tmp = `${file}.${process.pid}.tmp`;
    esbuild.buildSync({ ...OPTIONS, loader: { ...OPTIONS.loader }, define: { ...OPTIONS.define }, stdin: { contents: entrySource(), resolveDir: root, sourcefile: "plotly-entry.js" }, outfile: tmp, logLevel: "error" });
    fs.renameSync(tmp, file);
  }
  const dir = path.dirname(file);
  for (const f of fs.readdirSync(dir)) if (/^plotly-.*\.min\.js$/.test(f) && f !== path.basename(file)) fs.rmSync(path.join(dir, f), { force: true });
  return src;
}
