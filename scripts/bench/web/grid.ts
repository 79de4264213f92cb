/**
 * Part "grid": one ≈27 MB file of 4096 spectra × 512 points pushed with `bandcross push` and
 * processed end to end (goal ≤ 10 s), with the time split: client side (hash, register, PUT,
 * complete) from the push's own progress, and the worker's side (queue wait, download, parse,
 * picks, store, refit) from the worker's log.
 *
 * The delimited importer takes positions only from file-level metadata (`# x_nm:`), not per
 * column, so the 4096 spectra are one line: one file-level setpoint, gaps varying along the line.
 */
import fs from "node:fs";
import path from "node:path";
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { uploads } from "@/db/schema";
import { makeSpectrum } from "@/lib/spectra";
import { benchLab, line, pushDir, reportPushFailures, sampleWithSession, STEP_512, tempDir, verdict, workerLogFor } from "./common";

export async function run() {
  const lab = await benchLab();
  const { sessionId } = await sampleWithSession(lab, "GX-4096 line bench");
  const dir = tempDir("grid-4096");
  const n = 4096;
  let bias: Float64Array | null = null;
  const columns: { label: string; didv: Float64Array }[] = [];
  for (let k = 0; k < n; k++) {
    const gap = 0.25 + 0.15 * Math.sin(k / 97) * Math.cos(k / 331);
    const mid = 0.03 * Math.cos(k / 173);
    const s = makeSpectrum({ vbEdge_V: mid - gap / 2, cbEdge_V: mid + gap / 2, T_K: 4.5, vrms_mV: 2, noise: 0.02, seed: 5_100_000 + k, biasMin_V: -0.5, biasMax_V: 0.5, step_V: STEP_512 });
    bias ??= s.bias_V;
    columns.push({ label: `dI/dV ${k}`, didv: s.didv });
  }
  // Tab-separated with 8 significant digits, as an acquisition program exports a map (≈27 MB).
  const file = path.join(dir, "line-4096.tsv");
  const rows = ["# setpoint_bias_V: 0.6", "# setpoint_current_A: 2e-10", "# temperature_K: 4.5", "# lockin_modulation_mV_rms: 2", "# region: line A", ["bias (mV)", ...columns.map((c) => c.label)].join("\t")];
  for (let i = 0; i < bias!.length; i++) rows.push([(bias![i] * 1000).toFixed(4), ...columns.map((c) => c.didv[i].toExponential(7))].join("\t"));
  fs.writeFileSync(file, rows.join("\n") + "\n");
  const size = fs.statSync(file).size;
  line(`one file: ${n} spectra × ${bias!.length} points, ${(size / 1e6).toFixed(1)} MB`);

  const started = new Date();
  const r = await pushDir(lab, dir, sessionId);
  reportPushFailures(r);
  const f = r.summary?.files[0];
  line(`  bandcross push: ${f?.status ?? "?"}, ${f?.spectra ?? 0} spectra, exit ${r.code}`);
  verdict("27 MB grid file pushed and processed end to end", r.wall_s, 10, "s", 1);

  const [u] = await db().select().from(uploads).where(eq(uploads.sessionId, sessionId));
  if (!u) return;
  // The worker logs after its refit, which may end a moment after the upload is marked done.
  let log = "";
  for (let i = 0; i < 100 && !log; i++) {
    log = workerLogFor(u.id).find((l) => / done \(/.test(l)) ?? "";
    if (!log) await new Promise((r) => setTimeout(r, 100));
  }
  const total = Number(/(\d+) ms/.exec(log)?.[1] ?? NaN);
  const stages = /\[(.*)\]/.exec(log)?.[1];
  const registered = (u.createdAt.getTime() - started.getTime()) / 1000;
  const finished = (u.updatedAt.getTime() - started.getTime()) / 1000;
  line(`  split (from the start of the push):`);
  line(`    upload registered (CLI start-up, read + SHA-256)   ${registered.toFixed(2)} s`);
  line(`    PUT to storage, complete, queue, worker until stored  ${(finished - registered).toFixed(2)} s`);
  if (Number.isFinite(total)) line(`      of which the worker's processUpload (read, parse, picks, store, refit) ${(total / 1000).toFixed(2)} s${stages ? `  (${stages})` : ""}`);
  line(`    stored as done at                                 ${finished.toFixed(2)} s`);
  line(`    push noticed it and exited (status polling)       ${r.wall_s.toFixed(2)} s`);
}
