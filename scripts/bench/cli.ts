/**
 * `npm run bench -- cli`: how long the `bandcross` command takes, whole process, to analyse one
 * small file (one spectrum, 500 points) through its three doors: the built command
 * (node_modules/.bin/bandcross), the documented `npm run --silent bandcross --`, and the sources
 * through tsx (how every call ran before the build). An empty `node -e 0` beside them gives the
 * machine's own start-up cost, which on a loaded 2-core machine is most of the figure.
 * Runs interleaved, median of 7 each. Goals: ≤ 0.25 s and ≤ 0.6 s.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { makeSpectrum } from "../../lib/spectra";

const root = new URL("../../", import.meta.url).pathname;
const line = (s = "") => process.stdout.write(s + "\n");
const ROUNDS = 7;

export async function run() {
  const dir = mkdtempSync(join(tmpdir(), "bandcross-bench-cli-"));
  try {
    const s = makeSpectrum({ vbEdge_V: -0.12, cbEdge_V: 0.18, T_K: 4.5, vrms_mV: 2, seed: 61 });
    const rows = ["bias (V),dI/dV (a.u.)"];
    for (let i = 0; i < s.bias_V.length; i++) rows.push(`${s.bias_V[i]},${s.didv[i]}`);
    const file = join(dir, "one.csv");
    writeFileSync(file, rows.join("\n") + "\n");
    const doors: [string, string, string[], number | null][] = [
      ["node -e 0 (machine start-up)", process.execPath, ["-e", "0"], null],
      ["node_modules/.bin/bandcross analyze", join(root, "node_modules/.bin/bandcross"), ["analyze", file], 0.25],
      ["npm run --silent bandcross -- analyze", "npm", ["run", "--silent", "bandcross", "--", "analyze", file], 0.6],
      ["node --import tsx lib/cli/main.ts analyze", process.execPath, ["--import", "tsx", "lib/cli/main.ts", "analyze", file], null],
    ];
    const times: number[][] = doors.map(() => []);
    // One call first, unmeasured: it rebuilds the command if a source changed since the last build.
    spawnSync(doors[1][1], doors[1][2], { cwd: root });
    for (let r = 0; r < ROUNDS; r++)
      doors.forEach(([, cmd, args], k) => {
        const t = performance.now();
        const p = spawnSync(cmd, args, { cwd: root, encoding: "utf8" });
        times[k].push((performance.now() - t) / 1000);
        if (p.status !== 0) throw new Error(`${cmd} ${args.join(" ")} failed (exit ${p.status}): ${p.stderr.slice(0, 300)}`);
      });
    line(`one file, whole process, median of ${ROUNDS} (min):`);
    doors.forEach(([label, , , goal], k) => {
      const sorted = times[k].sort((a, b) => a - b);
      const median = sorted[Math.floor(sorted.length / 2)];
      const verdict = goal === null ? "" : median <= goal ? `  (goal ≤ ${goal} s)` : `  MISSED goal ≤ ${goal} s`;
      line(`  ${label.padEnd(44)} ${median.toFixed(3)} s (${sorted[0].toFixed(3)})${verdict}`);
    });
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
