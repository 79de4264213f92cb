import "server-only";
import { and, eq, inArray, min } from "drizzle-orm";
import type { DbCtx } from "@/lib/base/context";
import { gapPicks, measurementSessions, spectra, spectrumAverageMembers, tips } from "@/db/schema";
import { averageSpectra, PrepareError } from "@/lib/spectra";
import { invalid } from "@/lib/base/errors";
import { analyzeSpectrum, metaOfRow, pickColumns } from "./analyzeSpectrum";
import { loadSampleAnalysis } from "./loadSampleAnalysis";

const mean = (xs: (number | null)[]) => {
  const v = xs.filter((x): x is number => x != null);
  return v.length === xs.length && v.length ? v.reduce((a, b) => a + b, 0) / v.length : null;
};

/**
 * Averages stored spectra (repeats at one point: `averageSpectra` of lib/spectra) into a spectrum of
 * kind `average`, with its standard error, its automatic pick on the view the sample's settings name,
 * its distance and field, and its members (used or left out, with the reason). Runs in the caller's
 * transaction: a refusal (a `PrepareError`, as a 422 with its words) stores nothing. The members are
 * given in their order; `include` are members put back by hand. Returns the average's id and what the
 * test left out.
 */
export async function storeAverage({ ctx, input }: { ctx: DbCtx; input: { memberIds: string[]; include?: string[]; createdBy: string | null } }) {
  const { db } = ctx;
  const rows = await db.select().from(spectra).where(inArray(spectra.id, input.memberIds));
  const members = input.memberIds.map((id) => rows.find((r) => r.id === id)!);
  const [session] = await db.select({ t: measurementSessions.temperatureK }).from(measurementSessions).where(eq(measurementSessions.id, members[0].sessionId));
  const include = (input.include ?? []).map((id) => input.memberIds.indexOf(id)).filter((i) => i >= 0);
  let avg;
  try {
    avg = averageSpectra(
      members.map((m) => ({ bias_V: m.biasV, didv: m.didv, current_A: m.currentA, meta: metaOfRow(m), label: `${m.sourceName} #${m.indexInFile} ${m.label}` })),
      { include },
    );
  } catch (e) {
    if (e instanceof PrepareError) throw invalid(`Cannot average these spectra: ${e.message}.`);
    throw e;
  }
  const used = avg.averagedFrom.map((i) => members[i]);
  const first = members[0];
  const analysis = await loadSampleAnalysis({ ctx, input: { sampleId: first.sampleId } });
  const [tip] = first.tipId ? await db.select().from(tips).where(eq(tips.id, first.tipId)) : [];
  const meta = {
    ...metaOfRow(first, session?.t),
    x_nm: mean(used.map((m) => m.xNm)) ?? undefined,
    y_nm: mean(used.map((m) => m.yNm)) ?? undefined,
  };
  const { pick, view, field } = analyzeSpectrum({ bias_V: avg.bias_V, didv: avg.didv, current_A: avg.current_A, meta }, { settings: analysis.settings, model: analysis.modelFor(tip ?? null) });
  const { warning: fieldWarning, ...fieldCols } = field;
  const [{ lowest }] = await db
    .select({ lowest: min(spectra.indexInFile) })
    .from(spectra)
    .where(and(eq(spectra.uploadId, first.uploadId), eq(spectra.sourceName, first.sourceName)));
  const [row] = await db
    .insert(spectra)
    .values({
      labId: first.labId,
      uploadId: first.uploadId,
      sessionId: first.sessionId,
      sampleId: first.sampleId,
      tipId: first.tipId,
      sourceName: first.sourceName,
      indexInFile: Math.min(-1, (lowest ?? 0) - 1),
      label: `average of ${used.length} of ${members.length} repeats`,
      rawSha256: first.rawSha256,
      nPoints: avg.bias_V.length,
      biasV: avg.bias_V,
      didv: avg.didv,
      currentA: avg.current_A,
      stderr: avg.stderr,
      setpointBiasV: first.setpointBiasV,
      setpointCurrentA: first.setpointCurrentA,
      zOffsetPm: first.zOffsetPm,
      lockinModulationMvRms: first.lockinModulationMvRms,
      temperatureK: first.temperatureK,
      xNm: meta.x_nm ?? null,
      yNm: meta.y_nm ?? null,
      region: first.region,
      meta: first.meta,
      warnings: [...avg.warnings, ...pick.warnings, ...(fieldWarning ? [fieldWarning] : [])],
      ...fieldCols,
      fieldModelVersionId: analysis.fieldVersion.id,
      kind: "average",
      createdBy: input.createdBy,
    })
    .returning({ id: spectra.id });
  await db.insert(gapPicks).values({ labId: first.labId, spectrumId: row.id, ...pickColumns(pick, analysis.settingsVersion.id, view) });
  const out = new Map(avg.leftOut.map((l) => [l.index, l]));
  await db.insert(spectrumAverageMembers).values(
    members.map((m, i) => ({
      averageId: row.id,
      memberId: m.id,
      labId: m.labId,
      position: i,
      used: !out.has(i),
      leftOutReason: out.get(i)?.reason ?? null,
      statistic: out.get(i)?.statistic ?? null,
      limit: out.get(i)?.limit ?? null,
      putBack: include.includes(i),
    })),
  );
  return { id: row.id, leftOut: avg.leftOut.map((l) => members[l.index].id), warnings: avg.warnings };
}
