import "server-only";
import { and, asc, eq, gt, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import type { DbCtx } from "@/lib/base/context";
import { analysisRuns, gapPicks, measurementSessions, spectra, tips } from "@/db/schema";
import { repeatGroups as repeatGroupsOf, type QualityFlag } from "@/lib/spectra";
import { analyzeSpectrum, metaOfRow, pickColumns, repeatFlags, type RepeatCandidate } from "./analyzeSpectrum";
import { refitSample } from "./refitSample";
import type { RefitResult } from "./shared";
import { loadSampleAnalysis } from "./loadSampleAnalysis";

const CHUNK = 250;

/**
 * Re-runs a sample's analysis with its current versions: every spectrum's distance and field with
 * the current field model, and every automatic pick with the current extraction settings. Picks an
 * analyst corrected by hand keep their edges (their stored automatic pick and its quality flags,
 * which describe the data, are refreshed beside them; repeats at one point are compared again).
 * Progress is written to analysis_runs as it goes, in chunks, each its own transaction:
 * `running` with the spectra done, then `fitting` while the sample is refitted, then `done`.
 */
export async function reanalyzeSample({ ctx, input }: { ctx: DbCtx; input: { sampleId: string; runIds?: string[] } }): Promise<RefitResult | "superseded"> {
  const { db } = ctx;
  const analysis = await loadSampleAnalysis({ ctx, input });
  const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(spectra).where(eq(spectra.sampleId, input.sampleId));
  const runs = input.runIds?.length ? inArray(analysisRuns.id, input.runIds) : undefined;
  if (runs) await db.update(analysisRuns).set({ status: "running", total: n, done: 0, updatedAt: new Date() }).where(runs);
  const tipRows = await db.select().from(tips).where(eq(tips.labId, analysis.sample.labId));
  const tipById = new Map(tipRows.map((t) => [t.id, t]));
  const sessions = await db.select({ id: measurementSessions.id, temperatureK: measurementSessions.temperatureK }).from(measurementSessions).where(eq(measurementSessions.sampleId, input.sampleId));
  const sessionT = new Map(sessions.map((s) => [s.id, s.temperatureK]));

  let after = "00000000-0000-0000-0000-000000000000";
  let done = 0;
  for (;;) {
    const rows = await db
      .select({ s: spectra, pickId: gapPicks.id, source: gapPicks.source })
      .from(spectra)
      .innerJoin(gapPicks, eq(gapPicks.spectrumId, spectra.id))
      .where(and(eq(spectra.sampleId, input.sampleId), gt(spectra.id, after)))
      .orderBy(asc(spectra.id))
      .limit(CHUNK);
    if (rows.length === 0) break;
    // A newer version saved meanwhile has its own run queued: stop, and leave the runs to it, so
    // two re-analyses of a sample never interleave with different versions.
    const latest = await loadSampleAnalysis({ ctx, input });
    if (latest.settingsVersion.id !== analysis.settingsVersion.id || latest.fieldVersion.id !== analysis.fieldVersion.id) return "superseded";
    await db.transaction(async (tx) => {
      for (const { s, pickId, source } of rows) {
        const model = analysis.modelFor(s.tipId ? (tipById.get(s.tipId) ?? null) : null);
        const input = { bias_V: s.biasV, didv: s.didv, current_A: s.currentA, meta: metaOfRow(s, sessionT.get(s.sessionId)) };
        const { pick, view, field } = analyzeSpectrum(input, { settings: analysis.settings, model });
        const { warning: _w, ...fieldCols } = field;
        await tx.update(spectra).set({ ...fieldCols, fieldModelVersionId: analysis.fieldVersion.id, updatedAt: new Date() }).where(eq(spectra.id, s.id));
        const cols = pickColumns(pick, analysis.settingsVersion.id, view);
        if (source === "auto") {
          await tx.update(gapPicks).set({ ...cols, version: sql`${gapPicks.version} + 1`, updatedAt: new Date() }).where(eq(gapPicks.id, pickId));
        } else {
          await tx.update(gapPicks).set({ autoPick: cols.autoPick, flags: cols.flags, updatedAt: new Date() }).where(eq(gapPicks.id, pickId));
        }
      }
    });
    done += rows.length;
    after = rows[rows.length - 1].s.id;
    if (runs) await db.update(analysisRuns).set({ done, updatedAt: new Date() }).where(runs);
  }
  // Every spectrum is done, but the work is not: the repeat check and the refit (and its alert
  // decision) come next, and the run says so until it has ended, so no one reads "25 of 25" as finished.
  if (runs) await db.update(analysisRuns).set({ status: "fitting", done, updatedAt: new Date() }).where(runs);
  await reflagRepeats(db, input.sampleId);
  const refit = await refitSample({ ctx, input });
  if (runs) await db.update(analysisRuns).set({ status: "done", done, updatedAt: new Date() }).where(runs);
  return refit;
}

/**
 * Repeats at one point (within one file) are compared again after their picks were re-made: their
 * flags become the automatic pick's own plus the tip-change or drift flags of the comparison. Only
 * the metadata of the sample's spectra is read to find repeats; arrays only for those that are.
 */
async function reflagRepeats(db: DbOrTx, sampleId: string): Promise<void> {
  const metas = await db
    .select({ id: spectra.id, uploadId: spectra.uploadId, sourceName: spectra.sourceName, x: spectra.xNm, y: spectra.yNm, vset: spectra.setpointBiasV, iset: spectra.setpointCurrentA, extra: spectra.meta })
    .from(spectra)
    .where(and(eq(spectra.sampleId, sampleId), eq(spectra.kind, "measured")))
    .orderBy(spectra.indexInFile);
  const meta = (m: (typeof metas)[number]) => ({ x_nm: m.x ?? undefined, y_nm: m.y ?? undefined, setpoint_bias_V: m.vset ?? undefined, setpoint_current_A: m.iset ?? undefined, extra: m.extra });
  const byFile = new Map<string, (typeof metas)[number][]>();
  for (const m of metas) byFile.set(`${m.uploadId}/${m.sourceName}`, [...(byFile.get(`${m.uploadId}/${m.sourceName}`) ?? []), m]);
  const ids = [...byFile.values()].flatMap((rows) => repeatGroupsOf(rows.map(meta)).flatMap((g) => g.map((i) => rows[i].id)));
  if (ids.length === 0) return;
  const rows = await db
    .select({ id: spectra.id, uploadId: spectra.uploadId, sourceName: spectra.sourceName, x: spectra.xNm, y: spectra.yNm, vset: spectra.setpointBiasV, iset: spectra.setpointCurrentA, extra: spectra.meta, biasV: spectra.biasV, didv: spectra.didv, pickId: gapPicks.id, autoPick: gapPicks.autoPick })
    .from(spectra)
    .innerJoin(gapPicks, eq(gapPicks.spectrumId, spectra.id))
    .where(inArray(spectra.id, ids))
    .orderBy(spectra.indexInFile);
  const items: RepeatCandidate[] = rows.map((r) => ({ file: `${r.uploadId}/${r.sourceName}`, meta: meta(r), bias_V: r.biasV, didv: r.didv, pick: r.autoPick as unknown as RepeatCandidate["pick"] }));
  const added = repeatFlags(items);
  await db.transaction(async (tx) => {
    for (let i = 0; i < rows.length; i++) {
      const own = ((rows[i].autoPick as { flags?: unknown[] }).flags ?? []) as QualityFlag[];
      await tx.update(gapPicks).set({ flags: [...own, ...added[i]], updatedAt: new Date() }).where(eq(gapPicks.id, rows[i].pickId));
    }
  });
}
