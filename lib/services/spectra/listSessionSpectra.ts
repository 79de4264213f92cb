import "server-only";
import { and, asc, eq, ilike, isNull, or, sql, type SQL } from "drizzle-orm";
import { gapPicks, measurementSessions, spectra } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { SpectraQuery } from "@/lib/schemas/uploads";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { assertSampleVisible } from "../samples/visibility";

const SORT_COLS = {
  index: [spectra.sourceName, spectra.indexInFile],
  file: [spectra.sourceName],
  region: [spectra.region],
  setpointCurrent: [spectra.setpointCurrentA],
  zOffset: [spectra.zOffsetPm],
  gap: [gapPicks.gapEv],
  field: [spectra.fieldVPerNm],
} as const;

/** The table's flag filter: any flag, none (spectra without a pick too), or one flag's code. */
function flagFilter(flag: NonNullable<SpectraQuery["flag"]>): SQL {
  if (flag === "flagged") return sql`jsonb_array_length(${gapPicks.flags}) > 0`;
  if (flag === "unflagged") return sql`coalesce(jsonb_array_length(${gapPicks.flags}), 0) = 0`;
  return sql`${gapPicks.flags} @> ${JSON.stringify([{ code: flag }])}::jsonb`;
}

/** A session's spectra for the tagging table: sorted, filtered and paginated in the database. */
export async function listSessionSpectra({ ctx, input }: { ctx: Ctx; input: { sessionId: string; query: SpectraQuery } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.sessionId)) throw notFound("session");
  const [session] = await ctx.db.select({ id: measurementSessions.id, sampleId: measurementSessions.sampleId }).from(measurementSessions).where(and(eq(measurementSessions.id, input.sessionId), eq(measurementSessions.labId, ctx.actor.labId)));
  if (!session) throw notFound("session");
  await assertSampleVisible(ctx, session.sampleId, "session");
  const q = input.query;
  const filters: (SQL | undefined)[] = [eq(spectra.sessionId, session.id)];
  if (q.q) filters.push(or(ilike(spectra.sourceName, `%${q.q}%`), ilike(spectra.label, `%${q.q}%`), ilike(spectra.region, `%${q.q}%`)));
  if (q.region) filters.push(q.region === "(none)" ? isNull(spectra.region) : eq(spectra.region, q.region));
  if (q.flag) filters.push(flagFilter(q.flag));
  const where = and(...filters);
  const order = SORT_COLS[q.sort].map((c) => (q.dir === "desc" ? sql`${c} desc nulls last` : sql`${c} asc nulls last`));
  const [{ total }] = await ctx.db.select({ total: sql<number>`count(*)::int` }).from(spectra).leftJoin(gapPicks, eq(gapPicks.spectrumId, spectra.id)).where(where);
  const rows = await ctx.db
    .select({
      id: spectra.id,
      sourceName: spectra.sourceName,
      index: spectra.indexInFile,
      label: spectra.label,
      region: spectra.region,
      setpointBias_V: spectra.setpointBiasV,
      setpointCurrent_A: spectra.setpointCurrentA,
      zOffset_pm: spectra.zOffsetPm,
      tipId: spectra.tipId,
      field_V_per_nm: spectra.fieldVPerNm,
      fieldSigma_V_per_nm: spectra.fieldSigmaVPerNm,
      gap_eV: gapPicks.gapEv,
      closed: gapPicks.closed,
      pickStatus: gapPicks.status,
      source: gapPicks.source,
      excluded: gapPicks.excluded,
      flags: gapPicks.flags,
    })
    .from(spectra)
    .leftJoin(gapPicks, eq(gapPicks.spectrumId, spectra.id))
    .where(where)
    .orderBy(...order, asc(spectra.id))
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize);
  const regions = await ctx.db.selectDistinct({ region: spectra.region }).from(spectra).where(eq(spectra.sessionId, session.id));
  return { total, page: q.page, pageSize: q.pageSize, rows, regions: regions.map((r) => r.region).filter((r): r is string => r != null).sort() };
}
