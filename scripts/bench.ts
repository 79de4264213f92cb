/**
 * `npm run bench [-- PART...]`: runs the benchmark parts in order (all of them, or only those named).
 * Add a part by writing scripts/bench/<name>.ts exporting `run(): Promise<void>` and listing it below.
 *
 * The web parts need a running Bandcross: when they are asked for, this runner starts a throwaway
 * stack of their own (`scripts/stack.ts bench`: .bench-data/, its own ports, migrate, build unless
 * BANDCROSS_SKIP_BUILD=1, app + worker), which runs them and stops everything. `web` names all of
 * them. A missed goal is printed as MISSED; it does not fail the run.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";

type Part = () => Promise<{ run: () => Promise<void> }>;

const parts: Record<string, Part> = {
  spectra: () => import("./bench/spectra"),
  accuracy: () => import("./bench/accuracy"),
  cli: () => import("./bench/cli"),
  prepare: () => import("./bench/prepare"),
};

/** Parts that run inside the bench stack, in this order. */
const webParts: Record<string, Part> = {
  push: () => import("./bench/web/push"),
  grid: () => import("./bench/web/grid"),
  phase: () => import("./bench/web/phase"),
  browser: () => import("./bench/web/browser"),
};

const insideStack = process.env.BANDCROSS_BENCH_STACK === "1";

async function runPart(name: string, part: Part) {
  process.stdout.write(`\n=== ${name} ===\n`);
  const t = performance.now();
  await (await part()).run();
  process.stdout.write(`=== ${name}: ${((performance.now() - t) / 1000).toFixed(1)} s ===\n`);
}

/** Starts the bench stack, which calls this script again (inside it) with the web parts. */
function runInStack(names: string[]): Promise<number> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ["--import", "tsx", "scripts/stack.ts", "bench", ...names], { stdio: "inherit" });
    const forward = (sig: NodeJS.Signals) => child.kill(sig);
    process.on("SIGINT", forward);
    process.on("SIGTERM", forward);
    child.on("close", (code) => resolve(code ?? 1));
  });
}

async function main() {
  const args = process.argv.slice(2).filter((a) => !a.startsWith("-"));
  const wanted = args.flatMap((a) => (a === "web" ? Object.keys(webParts) : [a]));
  const known = [...Object.keys(parts), "web", ...Object.keys(webParts)];
  const unknown = wanted.filter((w) => !(w in parts) && !(w in webParts));
  if (unknown.length) {
    process.stderr.write(`bench: unknown part(s) ${unknown.join(", ")}; known: ${known.join(", ")}\n`);
    process.exitCode = 2;
    return;
  }
  const all = wanted.length ? wanted : [...Object.keys(parts), ...Object.keys(webParts)];
  const local = all.filter((n) => n in parts);
  const web = Object.keys(webParts).filter((n) => all.includes(n));

  if (insideStack) {
    const { missed } = await import("./bench/web/common");
    for (const name of web) await runPart(name, webParts[name]);
    process.stdout.write(missed.length ? `\nMISSED ${missed.length} goal(s):\n${missed.map((m) => `  MISSED  ${m}`).join("\n")}\n` : "\nall web goals met\n");
    const { closeDb } = await import("@/db/client");
    await closeDb();
    return;
  }
  for (const name of local) await runPart(name, parts[name]);
  if (web.includes("browser")) {
    // Checked before the stack is built: the part drives Debian's chromium (npm test installs it).
    const chromium = process.env.CHROMIUM_PATH || "/usr/bin/chromium";
    try {
      fs.accessSync(chromium, fs.constants.X_OK);
    } catch {
      process.stderr.write(`bench: the browser part needs chromium at ${chromium}: install it with \`apt-get install chromium\` (as root), or set CHROMIUM_PATH\n`);
      process.exitCode = 2;
      return;
    }
  }
  if (web.length) {
    process.stdout.write(`\n=== web (${web.join(", ")}) in a stack of its own ===\n`);
    const code = await runInStack(web);
    if (code !== 0) process.exitCode = code;
  }
}

main().catch((e) => {
  process.stderr.write(`bench: ${(e as Error).stack ?? (e as Error).message}\n`);
  process.exitCode = 1;
});
