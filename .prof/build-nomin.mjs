/**
 * Builds the `bandcross` command once, so a call runs plain JavaScript instead of transpiling
 * TypeScript on every start (tsx: about 1 s before any work).
 *
 * `node scripts/build-cli.mjs` (run by `npm ci` / `npm install` through `prepare`, and by
 * `npm run build`) bundles lib/cli/main.ts with esbuild into node_modules/.cache/bandcross-cli/
 * and links node_modules/.bin/bandcross to the launcher (lib/cli/bin.mjs); npm links the bins of
 * dependencies only, not the project's own. The launcher rebuilds through `buildCli()` when a
 * source listed in inputs.json is newer than the build.
 *
 * Plain JavaScript on purpose: it must run before anything is compiled.
 */
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
export const outDir = path.join(root, "node_modules", ".cache", "bandcross-cli");

/** Files whose change makes a build stale besides the bundled sources: the lock file and this script. */
const EXTRA_INPUTS = ["package-lock.json", "scripts/build-cli.mjs"];

function mtime(file) {
  try {
    return fs.statSync(file).mtimeMs;
  } catch {
    return Infinity; // missing: a source gone or renamed, or no build yet
  }
}

/** True when the build in `dir` exists and no file it was built from (inputs.json) is newer. */
export function isFresh(dir = outDir) {
  const built = mtime(path.join(dir, "main.js"));
  if (built === Infinity) return false;
  let inputs;
  try {
    inputs = JSON.parse(fs.readFileSync(path.join(dir, "inputs.json"), "utf8"));
  } catch {
    return false;
  }
  return inputs.every((f) => mtime(path.join(root, f)) <= built);
}

/** Writes a file whole or not at all: concurrent launchers may read while another rebuilds. */
function writeAtomic(file, contents) {
  const tmp = `${file}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`;
  fs.writeFileSync(tmp, contents);
  fs.renameSync(tmp, file);
}

/**
 * zod's namespace object carries every locale's messages (about half of the bundle's zod, parsed on
 * every start); the command speaks English only. If zod moves the file, the filter stops matching
 * and the bundle is only bigger.
 */
const englishOnly = {
  name: "zod-english-only",
  setup(build) {
    build.onLoad({ filter: /[\\/]zod[\\/]v4[\\/]locales[\\/]index\.js$/ }, (args) => ({
      contents: 'export { default as en } from "./en.js";',
      resolveDir: path.dirname(args.path),
    }));
  },
};

/**
 * Bundles the command. `server-only` resolves to its empty module through the react-server
 * condition (the token command reads the database through services that import it); `pg` stays
 * outside (optional native parts), so the token command loads it from node_modules when it runs.
 * The database code sits in its own chunks, loaded by `token create` only.
 */
export async function buildCli(dir = outDir) {
  const entryFile = path.join(dir, "main.js");
  const esbuild = await import("esbuild");
  const result = await esbuild.build({
    absWorkingDir: root,
    entryPoints: { main: "lib/cli/main.ts", "pick-worker": "lib/cli/pick-worker.ts" },
    bundle: true,
    splitting: true,
    format: "esm",
    platform: "node",
    target: "node20",
    conditions: ["react-server"],
    alias: { "@": root },
    external: ["pg", "pg-native"],
    plugins: [englishOnly],
    // Bundled CommonJS dependencies may call require(); give the ESM output one.
    banner: { js: "import { createRequire as __bxRequire } from 'node:module'; const require = __bxRequire(import.meta.url);" },
    outdir: dir,
    chunkNames: "chunk-[hash]",
    minify: false, keepNames: true,
    metafile: true,
    write: false,
    logLevel: "warning",
  });
  fs.mkdirSync(dir, { recursive: true });
  // Chunks are named by their content, so writing them beside an older build is safe; the entry
  // goes last, when everything it imports is in place.
  const entry = result.outputFiles.find((f) => f.path === entryFile);
  for (const f of result.outputFiles) if (f !== entry) writeAtomic(f.path, f.contents);
  writeAtomic(entryFile, entry.contents);
  const current = new Set(result.outputFiles.map((f) => path.basename(f.path)));
  for (const name of fs.readdirSync(dir))
    if (/^chunk-.*\.js$/.test(name) && !current.has(name)) fs.rmSync(path.join(dir, name), { force: true });
  const inputs = [...Object.keys(result.metafile.inputs).filter((f) => !f.startsWith("node_modules/")), ...EXTRA_INPUTS];
  writeAtomic(path.join(dir, "inputs.json"), JSON.stringify(inputs) + "\n");
  return entryFile;
}

/** Links node_modules/.bin/bandcross to the launcher, as npm would for a dependency's bin. */
export function linkBin() {
  const binDir = path.join(root, "node_modules", ".bin");
  const link = path.join(binDir, "bandcross");
  fs.mkdirSync(binDir, { recursive: true });
  fs.rmSync(link, { force: true });
  fs.symlinkSync(path.relative(binDir, path.join(root, "lib", "cli", "bin.mjs")), link);
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  await buildCli();
  linkBin();
}
