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
 * versions of plotly.js and esbuild, the build options, the patches), so the address changes when the
 * content can, and the file can be cached for a year. Built once: an existing file is kept.
 */

/** Trace types beyond Plotly's core (which has `scatter`), as `plotly.js/lib/<name>` modules. */
export const PLOTLY_TRACES = ["scattergl", "heatmap"] as const;

// Resolved from the project root (this file is loaded by next.config.ts and by scripts).
const require = createRequire(path.join(process.cwd(), "package.json"));

function versionOf(pkg: string): string {
  return (JSON.parse(fs.readFileSync(require.resolve(`${pkg}/package.json`), "utf8")) as { version: string }).version;
}

/**
 * Where a trace type's module is, when not `plotly.js/lib/<name>`: the WebGL scatter in Plotly's
 * CSP-safe ("strict") form, which draws with regl procedures generated ahead of time
 * (`regl_precompiled.js`) instead of compiling them with `Function` in the page, so pages need no
 * 'unsafe-eval' in their Content-Security-Policy (lib/web/csp.ts).
 */
const TRACE_MODULES: Partial<Record<(typeof PLOTLY_TRACES)[number], string>> = {
  scattergl: "plotly.js/src/traces/scattergl/strict",
};

function entrySource(): string {
  const traces = PLOTLY_TRACES.map((t) => `require("${TRACE_MODULES[t] ?? `plotly.js/lib/${t}`}")`).join(", ");
  return `var Plotly = require("plotly.js/lib/core");\nPlotly.register([${traces}]);\nmodule.exports = Plotly;\n`;
}

const OPTIONS = {
  bundle: true,
  minify: true,
  format: "iife",
  globalName: "Plotly",
  target: "es2020",
  legalComments: "inline",
  // Node's `global` in some of Plotly's dependencies. Their `require("buffer")` finds the browser
  // package of that name, a dependency of ours for this reason.
  define: { global: "window" },
  // Plotly asks for the map library's stylesheet when a map trace registers; there is none here.
  loader: { ".css": "empty" },
} as const;

/**
 * Changes to dependencies' code, made while bundling, each to an exact text: a dependency update
 * that changes one fails the build, so a change is never silently lost. Measured on a standalone
 * page with 5,000 scattergl points in chromium without a GPU (DEVELOPERS.md).
 *
 * 1. regl (through which Plotly draws WebGL) finds the procedures the CSP-safe scatter brings
 *    precompiled by a SHA-256 of the source it generates, computed by a string-based JavaScript
 *    SHA-256: 50-120 ms of each page's first draw. It is computed with @noble/hashes instead (the
 *    same digest of the same UTF-8 bytes, some ten times faster). An earlier change keyed the cache
 *    by the source itself, with no hashing at all; precompiled procedures cannot be found that way.
 * 2-3. Plotly makes a second WebGL context (its "focus" canvas) for every WebGL plot, but draws
 *    on it only once points are selected (box or lasso). It is now made then, on the first
 *    selection; a selection draws pixel-for-pixel as before. Draw 274-384 ms -> 158-214 ms;
 *    first visit, to the screen, 757-906 ms -> 550-684 ms.
 */
const PATCHES = [
  {
    file: /@plotly[\\/]regl[\\/]dist[\\/]regl(\.unchecked)?\.js$/,
    from: "key = hex_sha256(src);",
    to: 'key = require("@noble/hashes/utils").bytesToHex(require("@noble/hashes/sha2").sha256(new TextEncoder().encode(src)));',
  },
  {
    file: /plotly\.js[\\/]src[\\/]lib[\\/]prepare_regl\.js$/,
    from: "if(d.pick && !fullLayout._has('parcoords')) return;",
    to: "if(d.pick && !fullLayout._has('parcoords')) return;\n        if(d.key === 'focusLayer' && !fullLayout._has('parcoords') && !gd._focusReglWanted) return;",
  },
  {
    file: /plotly\.js[\\/]src[\\/]traces[\\/]scattergl[\\/]plot\.js$/,
    from: "scene.select2d = createScatter(fullLayout._glcanvas.data()[1].regl);",
    to: "gd._focusReglWanted = true;\n            prepareRegl(gd, ['ANGLE_instanced_arrays', 'OES_element_index_uint'], reglPrecompiled);\n            scene.select2d = createScatter(fullLayout._glcanvas.data()[1].regl);",
  },
];

function patchPlugin(applied: Set<number>): import("esbuild").Plugin {
  return {
    name: "bandcross-patches",
    setup(build) {
      for (const [i, p] of PATCHES.entries()) {
        build.onLoad({ filter: p.file }, (args) => {
          const source = fs.readFileSync(args.path, "utf8");
          if (source.split(p.from).length !== 2) throw new Error(`${args.path}: expected exactly one "${p.from}" to change; the dependency has changed, review PATCHES in scripts/plotly-vendor.ts`);
          applied.add(i);
          return { contents: source.replace(p.from, p.to), loader: "js" };
        });
      }
    },
  };
}

/** The file's address under the site root, and where it lives on disk, for this checkout. */
export function plotlyVendorFile(root = process.cwd()): { src: string; file: string } {
  const version = versionOf("plotly.js");
  const key = createHash("sha256")
    .update(JSON.stringify({ entry: entrySource(), plotly: version, esbuild: versionOf("esbuild"), options: OPTIONS, patches: PATCHES.map((p) => [p.file.source, p.from, p.to]) }))
    .digest("hex")
    .slice(0, 10);
  const name = `plotly-${version}-${key}.min.js`;
  return { src: `/vendor/${name}`, file: path.join(root, "public", "vendor", name) };
}

/**
 * For `next start`: the library the build made (the pages name it in their code), found in
 * public/vendor/ rather than recomputed, so a server whose installed packages differ from the
 * build machine's still points at the file its pages ask for; built only if there is none.
 */
export async function builtPlotly(root = process.cwd()): Promise<string> {
  const { src, file } = plotlyVendorFile(root);
  if (fs.existsSync(file)) return src;
  const dir = path.dirname(file);
  const built = fs.existsSync(dir)
    ? fs
        .readdirSync(dir)
        .filter((f) => /^plotly-.*\.min\.js$/.test(f))
        .map((f) => ({ f, t: fs.statSync(path.join(dir, f)).mtimeMs }))
        .sort((a, b) => b.t - a.t)
    : [];
  return built.length ? `/vendor/${built[0].f}` : vendorPlotly(root);
}

/**
 * Builds the file (from the packages installed in the working directory) into `root`/public/vendor/
 * unless it is there, removes that folder's other Plotly builds, and returns
 * its address. Written to a temporary name and renamed, so a server reading the folder never sees
 * half a file (several build workers may run this at once).
 */
export async function vendorPlotly(root = process.cwd()): Promise<string> {
  const { src, file } = plotlyVendorFile(root);
  if (!fs.existsSync(file)) {
    const esbuild = require("esbuild") as typeof import("esbuild");
    fs.mkdirSync(path.dirname(file), { recursive: true });
    const tmp = `${file}.${process.pid}.tmp`;
    const applied = new Set<number>();
    await esbuild.build({ ...OPTIONS, loader: { ...OPTIONS.loader }, define: { ...OPTIONS.define }, stdin: { contents: entrySource(), resolveDir: process.cwd(), sourcefile: "plotly-entry.js" }, outfile: tmp, plugins: [patchPlugin(applied)], logLevel: "error" });
    const missed = PATCHES.filter((_, i) => !applied.has(i));
    if (missed.length) {
      fs.rmSync(tmp, { force: true });
      throw new Error(`plotting library: no file matched ${missed.map((p) => p.file).join(", ")}; review PATCHES in scripts/plotly-vendor.ts`);
    }
    fs.renameSync(tmp, file);
  }
  const dir = path.dirname(file);
  for (const f of fs.readdirSync(dir)) if (/^plotly-.*\.min\.js$/.test(f) && f !== path.basename(file)) fs.rmSync(path.join(dir, f), { force: true });
  return src;
}
