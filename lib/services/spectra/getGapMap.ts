import "server-only";
import { and, asc, eq, isNotNull, sql } from "drizzle-orm";
import { gapPicks, spectra, uploads } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";
import { notInAverage } from "../analysis/shared";
import { getSample, isUuid } from "../samples/getSample";

/**
 * The gap over position for a grid upload of a sample: every spectrum of the chosen file that has
 * x and y (an average in its repeats' place), with its gap (null when no gap or excluded), its file name (the entry's name inside a
 * zip) and label, for the map's hover. The files with positions are listed so the page can switch
 * between grids.
 */
export async function getGapMap({ ctx, input }: { ctx: Ctx; input: { sampleId: string; uploadId?: string } }) {
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const grids = await ctx.db
    .select({ id: uploads.id, fileName: uploads.fileName, n: sql<number>`count(*)::int` })
    .from(spectra)
    .innerJoin(uploads, eq(uploads.id, spectra.uploadId))
    .where(and(eq(spectra.sampleId, sample.id), isNotNull(spectra.xNm), isNotNull(spectra.yNm), notInAverage))
    .groupBy(uploads.id, uploads.fileName)
    .orderBy(asc(uploads.fileName));
  const chosen = input.uploadId && isUuid(input.uploadId) ? grids.find((g) => g.id === input.uploadId) : grids.sort((a, b) => b.n - a.n)[0];
  if (!chosen) return { grids: [], uploadId: null, cells: [] };
  const cells = await ctx.db
    .select({ id: spectra.id, fileName: spectra.sourceName, label: spectra.label, x: spectra.xNm, y: spectra.yNm, gap: gapPicks.gapEv, closed: gapPicks.closed, status: gapPicks.status, excluded: gapPicks.excluded })
    .from(spectra)
    .leftJoin(gapPicks, eq(gapPicks.spectrumId, spectra.id))
    .where(and(eq(spectra.uploadId, chosen.id), eq(spectra.sampleId, sample.id), isNotNull(spectra.xNm), isNotNull(spectra.yNm), notInAverage));
  return {
    grids,
    uploadId: chosen.id,
    cells: cells.map((c) => ({ id: c.id, x_nm: c.x!, y_nm: c.y!, gap_eV: c.status === "ok" && !c.excluded ? c.gap : null, closed: c.closed ?? false, metallic: c.status === "no-gap", excluded: c.excluded ?? false, fileName: c.fileName, label: c.label })),
  };
}
