/**
 * Part "push": 200 single-spectrum files (synthetic field sweep, 512 points each) written to a
 * folder and pushed with `bandcross push` through the HTTP API; wall time from the start of the push
 * to every file processed (stored, picked, field-estimated, sample refitted). Goal ≤ 20 s.
 */
import fs from "node:fs";
import path from "node:path";
import { makeSweep, spectrumToCsv } from "@/lib/spectra";
import { benchLab, line, pushDir, reportPushFailures, sampleWithSession, STEP_512, tempDir, verdict } from "./common";

export async function run() {
  const lab = await benchLab();
  const { sessionId } = await sampleWithSession(lab, "GX-200 push bench");
  const dir = tempDir("push-200");
  const sweep = makeSweep({ n: 200, seed: 4242, step_V: STEP_512 });
  sweep.spectra.forEach((s, i) => fs.writeFileSync(path.join(dir, `sweep-${String(i).padStart(3, "0")}.csv`), spectrumToCsv(s)));
  const bytes = fs.readdirSync(dir).reduce((a, f) => a + fs.statSync(path.join(dir, f)).size, 0);
  line(`200 files of ${sweep.spectra[0].bias_V.length} points (${(bytes / 1e6).toFixed(1)} MB) in ${dir}`);
  const r = await pushDir(lab, dir, sessionId);
  reportPushFailures(r);
  const done = r.summary?.files.filter((f) => f.status === "done").length ?? 0;
  line(`  bandcross push: ${done}/200 done, exit ${r.code}`);
  verdict("200 files pushed and processed end to end", r.wall_s, 20, "s", 1);
}
