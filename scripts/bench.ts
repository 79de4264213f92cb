/**
 * `npm run bench [-- PART...]`: runs the benchmark parts in order (all of them, or only those named).
 * Add a part by writing scripts/bench/<name>.ts exporting `run(): Promise<void>` and listing it below.
 */
const parts: Record<string, () => Promise<{ run: () => Promise<void> }>> = {
  spectra: () => import("./bench/spectra"),
};

async function main() {
  const wanted = process.argv.slice(2).filter((a) => !a.startsWith("-"));
  const unknown = wanted.filter((w) => !(w in parts));
  if (unknown.length) {
    process.stderr.write(`bench: unknown part(s) ${unknown.join(", ")}; known: ${Object.keys(parts).join(", ")}\n`);
    process.exitCode = 2;
    return;
  }
  for (const name of wanted.length ? wanted : Object.keys(parts)) {
    process.stdout.write(`\n=== ${name} ===\n`);
    const t = performance.now();
    await (await parts[name]()).run();
    process.stdout.write(`=== ${name}: ${((performance.now() - t) / 1000).toFixed(1)} s ===\n`);
  }
}

main().catch((e) => {
  process.stderr.write(`bench: ${(e as Error).message}\n`);
  process.exitCode = 1;
});
