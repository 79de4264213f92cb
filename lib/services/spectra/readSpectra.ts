import "server-only";
import { and, asc, desc, eq, ilike, isNull, or, sql, type SQL } from "drizzle-orm";
import { crossings, extractionSettingsVersions, fieldModelVersions, gapPicks, labs, measurementSessions, samples, spectra, tips, uploads, type FlaggedInFit } from "@/db/schema";
import { assertCan } from "@/lib/auth/permissions";
import { pickGap, resolveExtractionSettings, sharedField, type QualityFlag } from "@/lib/spectra";
import { metaOfRow } from "../analysis/analyzeSpectrum";
import { flaggedOutOfFit } from "../analysis/refitSample";
import type { SpectraQuery } from "@/lib/schemas/uploads";
import type { Ctx } from "../context";
import { notFound } from "../errors";
import { getSample, isUuid } from "../samples/getSample";
import { assertSampleVisible, sampleVisibility } from "../samples/visibility";

/** One spectrum with everything needed to trust its numbers: arrays, metadata, pick, field, versions, raw-file hash. */
export async function getSpectrum({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.id)) throw notFound("spectrum");
  const visible = await sampleVisibility(ctx);
  const [row] = await ctx.db
    .select({ s: spectra, p: gapPicks, upload: { id: uploads.id, fileName: uploads.fileName }, sampleName: samples.name, sv: { id: extractionSettingsVersions.id, version: extractionSettingsVersions.version }, fv: { id: fieldModelVersions.id, version: fieldModelVersions.version }, tipLabel: tips.label, flaggedInFit: labs.flaggedInFit })
    .from(spectra)
    .innerJoin(labs, eq(labs.id, spectra.labId))
    .innerJoin(samples, eq(samples.id, spectra.sampleId))
    .innerJoin(uploads, eq(uploads.id, spectra.uploadId))
    .leftJoin(gapPicks, eq(gapPicks.spectrumId, spectra.id))
    .leftJoin(extractionSettingsVersions, eq(extractionSettingsVersions.id, gapPicks.settingsVersionId))
    .leftJoin(fieldModelVersions, eq(fieldModelVersions.id, spectra.fieldModelVersionId))
    .leftJoin(tips, eq(tips.id, spectra.tipId))
    .where(and(eq(spectra.id, input.id), eq(spectra.labId, ctx.actor.labId), visible));
  if (!row) throw notFound("spectrum");
  const { s, p } = row;
  const analysis = await analysisOf(ctx, s, p?.settingsVersionId ?? null);
  const neighbours = await neighboursOf(ctx, s.sampleId, s.id);
  return {
    id: s.id,
    sampleId: s.sampleId,
    sampleName: row.sampleName,
    sessionId: s.sessionId,
    upload: { id: row.upload.id, fileName: row.upload.fileName, sha256: s.rawSha256 },
    sourceName: s.sourceName,
    index: s.indexInFile,
    label: s.label,
    metadata: {
      setpointBias_V: s.setpointBiasV,
      setpointCurrent_A: s.setpointCurrentA,
      zOffset_pm: s.zOffsetPm,
      lockinModulation_mV_rms: s.lockinModulationMvRms,
      temperature_K: s.temperatureK,
      x_nm: s.xNm,
      y_nm: s.yNm,
      region: s.region,
      tipId: s.tipId,
      tipLabel: row.tipLabel,
      extra: s.meta,
    },
    warnings: s.warnings,
    arrays: { bias_V: Array.from(s.biasV), didv: Array.from(s.didv), current_A: s.currentA ? Array.from(s.currentA) : null },
    pick: p
      ? {
          version: p.version,
          source: p.source,
          status: p.status,
          vbEdge_V: p.vbEdgeV,
          cbEdge_V: p.cbEdgeV,
          gap_eV: p.gapEv,
          midgap_V: p.midgapV,
          uncertainty_eV: p.uncertaintyEv,
          closed: p.closed,
          resolution_meV: p.resolutionMev,
          method: p.method,
          excluded: p.excluded,
          excludedReason: p.excludedReason,
          /** Quality flags of the automatic pick (kept through a correction: they describe the data). */
          flags: p.flags,
          /** Left out of the crossing fit by the lab's flagged-spectra setting (not excluded by hand). */
          excludedByFlag: flaggedOutOfFit(row.flaggedInFit, p),
          auto: p.autoPick,
          updatedAt: p.updatedAt.toISOString(),
        }
      : null,
    distance_nm: s.distanceNm,
    distanceSigma_nm: s.distanceSigmaNm,
    field_V_per_nm: s.fieldVPerNm,
    fieldSigma_V_per_nm: s.fieldSigmaVPerNm,
    versions: { extractionSettings: row.sv?.id ? row.sv : null, fieldModel: row.fv?.id ? row.fv : null },
    analysis,
    neighbours,
  };
}

/**
 * What the review screen draws beside the raw curve: the smoothed curve, noise floor, threshold
 * and resolution, recomputed with the settings version that made the stored pick (about a
 * millisecond for a 512-point spectrum), so nothing derivable is stored twice.
 */
async function analysisOf(ctx: Ctx, s: typeof spectra.$inferSelect, settingsVersionId: string | null) {
  const [sv] = settingsVersionId ? await ctx.db.select().from(extractionSettingsVersions).where(eq(extractionSettingsVersions.id, settingsVersionId)) : [];
  const [session] = await ctx.db.select({ t: measurementSessions.temperatureK }).from(measurementSessions).where(eq(measurementSessions.id, s.sessionId));
  const settings = resolveExtractionSettings((sv?.settings ?? {}) as never);
  const meta = metaOfRow(s, session?.t);
  const pick = pickGap({ bias_V: s.biasV, didv: s.didv, meta }, settings);
  return {
    smoothed: Array.from(pick.smoothed),
    smoothing: pick.smoothing,
    noiseFloor: pick.noiseFloor,
    noiseSigma: pick.noiseSigma,
    threshold: pick.threshold,
    resolution_meV: pick.resolution_meV,
    thresholdEdges: pick.threshold_edges,
    logCheck: pick.logCheck,
    temperature_K: meta.temperature_K ?? settings.assumedTemperature_K,
    lockinModulation_mV_rms: meta.lockin_modulation_mV_rms ?? settings.assumedLockinModulation_mV_rms,
  };
}

/**
 * Position of a spectrum in its sample's review order (by field, then file), with its neighbours,
 * and the next spectrum in that order whose pick carries a quality flag (from the start again
 * after the last; null when no other is flagged), with how many are flagged.
 */
async function neighboursOf(ctx: Ctx, sampleId: string, id: string) {
  const rows = await ctx.db.execute(sql`
    with ordered as (
      select s.id, row_number() over (order by s.field_v_per_nm asc nulls last, s.source_name, s.index_in_file) as pos,
        lag(s.id) over (order by s.field_v_per_nm asc nulls last, s.source_name, s.index_in_file) as prev,
        lead(s.id) over (order by s.field_v_per_nm asc nulls last, s.source_name, s.index_in_file) as next,
        count(*) over () as total,
        coalesce(jsonb_array_length(p.flags), 0) > 0 as flagged
      from spectra s left join gap_picks p on p.spectrum_id = s.id
      where s.sample_id = ${sampleId} and s.lab_id = ${ctx.actor.labId}
    ), me as (select pos, prev, next, total from ordered where id = ${id})
    select me.pos, me.prev, me.next, me.total,
      (select o.id from ordered o where o.flagged and o.id <> ${id} order by (o.pos <= me.pos), o.pos limit 1) as next_flagged,
      (select count(*) from ordered o where o.flagged) as flagged
    from me`);
  const r = rows.rows[0] as { pos: string; prev: string | null; next: string | null; total: string; next_flagged: string | null; flagged: string } | undefined;
  return r
    ? { position: Number(r.pos), total: Number(r.total), prev: r.prev, next: r.next, nextFlagged: r.next_flagged, flagged: Number(r.flagged) }
    : { position: 1, total: 1, prev: null, next: null, nextFlagged: null, flagged: 0 };
}

export interface PhasePoint {
  spectrumId: string;
  field_V_per_nm: number;
  fieldSigma_V_per_nm: number | null;
  distance_nm: number | null;
  setpointConductance_S: number | null;
  gap_eV: number;
  gapSigma_eV: number | null;
  closed: boolean;
  source: "auto" | "corrected";
  excluded: boolean;
  region: string | null;
  /** Quality flags of the automatic pick; empty when nothing is in doubt. */
  flags: QualityFlag[];
  /** Left out of the crossing fit by the lab's flagged-spectra setting (`excluded` is by hand). */
  excludedByFlag: boolean;
  /** An analyst accepted this version of the pick as it is (keyboard review's A). */
  accepted: boolean;
}

/** The phase plot's data: every spectrum with a gap and a field, and the sample's current crossing. */
export async function getPhase({ ctx, input }: { ctx: Ctx; input: { sampleId: string; precise?: boolean } }) {
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const rows = await ctx.db
    .select({
      spectrumId: spectra.id,
      field: spectra.fieldVPerNm,
      fieldSigma: spectra.fieldSigmaVPerNm,
      distance: spectra.distanceNm,
      vset: spectra.setpointBiasV,
      iset: spectra.setpointCurrentA,
      gap: gapPicks.gapEv,
      gapSigma: gapPicks.uncertaintyEv,
      closed: gapPicks.closed,
      source: gapPicks.source,
      excluded: gapPicks.excluded,
      region: spectra.region,
      flags: gapPicks.flags,
      // Accepted by an analyst as it is now: an acceptance of this very version in the history.
      accepted: sql<boolean>`exists (select 1 from pick_history h where h.pick_id = ${gapPicks.id} and h.action = 'accept' and (h.after ->> 'version')::int = ${gapPicks.version})`,
    })
    .from(spectra)
    .innerJoin(gapPicks, eq(gapPicks.spectrumId, spectra.id))
    .where(and(eq(spectra.sampleId, sample.id), eq(gapPicks.status, "ok"), sql`${spectra.fieldVPerNm} is not null`, sql`${gapPicks.gapEv} is not null`))
    .orderBy(asc(spectra.fieldVPerNm));
  const setting = await labFlaggedInFit(ctx);
  // Plot precision unless `precise` (the exports and the spectrum endpoint keep every digit): fields to 6
  // significant digits, gaps to 0.1 µeV — far below any uncertainty here, and a third less to send.
  const sig = input.precise ? (x: number) => x : sigDigits;
  const round = input.precise ? (x: number) => x : roundTo;
  const points: PhasePoint[] = rows.map((r) => ({
    spectrumId: r.spectrumId,
    field_V_per_nm: sig(r.field!, 6),
    fieldSigma_V_per_nm: r.fieldSigma == null ? null : sig(r.fieldSigma, 3),
    distance_nm: r.distance == null ? null : sig(r.distance, 6),
    setpointConductance_S: r.vset && r.iset ? sig(Math.abs(r.iset / r.vset), 5) : null,
    gap_eV: round(r.gap!, 7),
    gapSigma_eV: r.gapSigma == null ? null : round(r.gapSigma, 7),
    closed: r.closed,
    source: r.source,
    excluded: r.excluded,
    region: r.region,
    flags: r.flags,
    excludedByFlag: flaggedOutOfFit(setting, r),
    accepted: r.accepted,
  }));
  const [row] = await ctx.db
    .select({ c: crossings, settingsVersion: extractionSettingsVersions.version, fieldModelVersion: fieldModelVersions.version })
    .from(crossings)
    .leftJoin(extractionSettingsVersions, eq(extractionSettingsVersions.id, crossings.settingsVersionId))
    .leftJoin(fieldModelVersions, eq(fieldModelVersions.id, crossings.fieldModelVersionId))
    .where(and(eq(crossings.sampleId, sample.id), isNull(crossings.region)))
    .orderBy(desc(crossings.createdAt))
    .limit(1);
  const c = row?.c;
  return {
    sample: { id: sample.id, name: sample.name },
    points,
    /** Set when every point sits at one field (a grid at one setpoint): that field, V/nm, and the count. */
    sharedField: sharedField(points),
    crossing: c
      ? {
          id: c.id,
          state: c.state,
          found: c.found,
          field_V_per_nm: c.fieldVPerNm,
          ci95_V_per_nm: c.ci95LoVPerNm != null && c.ci95HiVPerNm != null ? ([c.ci95LoVPerNm, c.ci95HiVPerNm] as [number, number]) : null,
          /** Interval from the data's scatter alone, without the field model's common scale uncertainty. */
          ci95Statistical_V_per_nm: ((c.comparison as { statisticalCi95_V_per_nm?: [number, number] | null }).statisticalCi95_V_per_nm ?? null) as [number, number] | null,
          slopes: c.slopeBelowEvPerVPerNm != null ? { below: c.slopeBelowEvPerVPerNm, above: c.slopeAboveEvPerVPerNm } : null,
          extrapolated_V_per_nm: c.extrapolatedVPerNm,
          n: c.nPoints,
          status: c.status,
          comparison: c.comparison,
          curve: c.curve,
          settingsVersionId: c.settingsVersionId,
          fieldModelVersionId: c.fieldModelVersionId,
          /** The version numbers the fit was made with, as the sample page names them. */
          settingsVersion: row.settingsVersion,
          fieldModelVersion: row.fieldModelVersion,
          fittedAt: c.createdAt.toISOString(),
        }
      : { state: "none" as const, found: false, field_V_per_nm: null, ci95_V_per_nm: null },
  };
}

/** The actor's lab's setting for flagged spectra in the critical-field fit. */
export async function labFlaggedInFit(ctx: Ctx): Promise<FlaggedInFit> {
  const [lab] = await ctx.db.select({ v: labs.flaggedInFit }).from(labs).where(eq(labs.id, ctx.actor.labId));
  return lab?.v ?? "include";
}

const SORT_COLS = {
  index: [spectra.sourceName, spectra.indexInFile],
  file: [spectra.sourceName],
  region: [spectra.region],
  setpointCurrent: [spectra.setpointCurrentA],
  zOffset: [spectra.zOffsetPm],
  gap: [gapPicks.gapEv],
  field: [spectra.fieldVPerNm],
} as const;

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

/** The table's flag filter: any flag, none (spectra without a pick too), or one flag's code. */
function flagFilter(flag: NonNullable<SpectraQuery["flag"]>): SQL {
  if (flag === "flagged") return sql`jsonb_array_length(${gapPicks.flags}) > 0`;
  if (flag === "unflagged") return sql`coalesce(jsonb_array_length(${gapPicks.flags}), 0) = 0`;
  return sql`${gapPicks.flags} @> ${JSON.stringify([{ code: flag }])}::jsonb`;
}

/** x to n significant digits. */
function sigDigits(x: number, n: number): number {
  return x === 0 || !Number.isFinite(x) ? x : Number(x.toPrecision(n));
}
/** x to d decimals. */
function roundTo(x: number, d: number): number {
  const f = 10 ** d;
  return Math.round(x * f) / f;
}
