#!/usr/bin/env node
/**
 * `bandcross`: runs the built command (scripts/build-cli.mjs) when it is as new as its sources,
 * rebuilds it first when it is missing or older than one of them (a pull, an edit: esbuild takes
 * under a second), and runs the sources through tsx only if the build cannot be written.
 * Plain JavaScript on purpose: it must start without a compiler.
 */
import { spawn } from "node:child_process";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { buildCli, isFresh, outDir, root } from "../../scripts/build-cli.mjs";

/** The way the command ran before it was built: TypeScript through tsx, in a child process. */
function runFromSources() {
  const main = path.join(root, "lib", "cli", "main.ts");
  // tsx by its path: the command runs from any directory, where a bare "tsx" would not resolve.
  const tsx = pathToFileURL(path.join(root, "node_modules", "tsx", "dist", "loader.mjs")).href;
  const args = ["--conditions=react-server", "--import", tsx, main, ...process.argv.slice(2)];
  const child = spawn(process.execPath, args, { stdio: "inherit" });
  child.on("exit", (code, signal) => (signal ? process.kill(process.pid, signal) : process.exit(code ?? 2)));
}

let entry = path.join(outDir, "main.js");
if (!isFresh()) {
  try {
    entry = await buildCli();
  } catch (e) {
    process.stderr.write(`bandcross: could not build the command (${e?.message ?? e}); running it from the sources\n`);
    entry = null;
  }
}
if (entry) await import(pathToFileURL(entry).href);
else runFromSources();
