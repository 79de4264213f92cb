/**
 * `npm run bench -- prepare`: preparing spectra against reading their gaps. 4,096 seeded model
 * spectra (1,024 points of four repeats, 501 points each) are averaged in groups of four (common
 * axis, odd-repeat test, mean and standard error) and Feenstra-normalised (current rebuilt from dI/dV),
 * and the 1,024 averages' gaps are picked; the goal is that the preparation takes less time than the
 * picking. Each stage is warmed by one pass, then the best of three passes counts (a worker reads many
 * spectra; a single cold pass mostly times the JIT).
 */
import { averageSpectra, makeRepeats, normaliseSpectrum, pickGap, type AveragedSpectrum, type SyntheticSpectrum } from "../../lib/spectra";

const POINTS = 1024;
const REPEATS = 4;

function best(f: () => void): number {
  f();
  let t = Infinity;
  for (let k = 0; k < 3; k++) {
    const t0 = performance.now();
    f();
    t = Math.min(t, performance.now() - t0);
  }
  return t;
}

export async function run(): Promise<void> {
  const t0 = performance.now();
  const groups: SyntheticSpectrum[][] = [];
  for (let p = 0; p < POINTS; p++) {
    const gap = 0.05 + (0.4 * p) / POINTS;
    groups.push(makeRepeats({ vbEdge_V: -gap / 2, cbEdge_V: gap / 2, noise: 0.03, seed: 9000 + p }, REPEATS));
  }
  process.stdout.write(`made ${POINTS * REPEATS} spectra in ${((performance.now() - t0) / 1000).toFixed(1)} s\n`);
  let averages: AveragedSpectrum[] = [];
  const prepare = best(() => {
    averages = groups.map((g) => averageSpectra(g));
    for (const a of averages) normaliseSpectrum(a, { method: "feenstra", broadening_mV: 100 });
  });
  const pick = best(() => {
    for (let i = 0; i < averages.length; i++) pickGap({ bias_V: averages[i].bias_V, didv: averages[i].didv, meta: groups[i][0].meta });
  });
  // For scale: picking every one of the 4,096 repeats, as a file read without averaging would.
  const pickAll = best(() => {
    for (const g of groups) for (const s of g) pickGap(s);
  });
  const leftOut = averages.reduce((n, a) => n + a.leftOut.length, 0);
  process.stdout.write(
    `average ${POINTS * REPEATS} spectra in groups of ${REPEATS} + Feenstra-normalise: ${prepare.toFixed(0)} ms ` +
      `(${((prepare / (POINTS * REPEATS)) * 1000).toFixed(1)} µs per spectrum; ${leftOut} repeats left out by noise alone)\n` +
      `pick the gaps of the ${POINTS} averages: ${pick.toFixed(0)} ms (${(pick / POINTS).toFixed(2)} ms per spectrum)\n` +
      `pick the gaps of all ${POINTS * REPEATS} repeats instead: ${pickAll.toFixed(0)} ms\n` +
      `${prepare < pick ? "goal met" : "MISSED"}: preparing takes ${(prepare / pick).toFixed(2)}× the time of picking the averages ` +
      `(goal < 1), ${(prepare / pickAll).toFixed(2)}× that of picking every repeat\n`,
  );
}
