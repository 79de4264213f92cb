/**
 * Child process of the spectra benchmark: read one grid file, import it and pick every spectrum,
 * print timings and the process's peak memory as one JSON line. Run in its own process so that the
 * peak memory belongs to this work alone.
 */
import { readFileSync } from "node:fs";
import { basename } from "node:path";
import { importSpectra, pickGap, resolveExtractionSettings } from "../../lib/spectra";

const path = process.argv[2];
const t0 = performance.now();
const bytes = readFileSync(path);
const files = importSpectra(basename(path), bytes);
const t1 = performance.now();
const spectra = files.flatMap((f) => f.spectra);
const settings = resolveExtractionSettings();
let ok = 0;
const gaps: number[] = [];
for (const s of spectra) {
  const p = pickGap(s, settings);
  if (p.status === "ok") {
    ok++;
    gaps.push(p.gap_eV!);
  }
}
const t2 = performance.now();
gaps.sort((a, b) => a - b);
process.stdout.write(
  JSON.stringify({
    n: spectra.length,
    ok,
    status: files.map((f) => f.status),
    read_s: (t1 - t0) / 1000,
    pick_s: (t2 - t1) / 1000,
    median_gap_eV: gaps[gaps.length >> 1],
    max_rss_MB: process.resourceUsage().maxRSS / 1024,
  }) + "\n",
);
