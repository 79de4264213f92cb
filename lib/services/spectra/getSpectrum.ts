import "server-only";
import { and, eq, sql } from "drizzle-orm";
import { extractionSettingsVersions, fieldModelVersions, gapPicks, labs, measurementSessions, samples, spectra, spectrumAverageMembers, tips, uploads } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { normaliseSpectrum, resolveExtractionSettings, type ExtractionSettings, type ViewInput } from "@/lib/spectra";
import { metaOfRow, pickOnSettingsView } from "../analysis/analyzeSpectrum";
import { flaggedOutOfFit } from "../analysis/shared";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { sampleVisibility } from "../samples/visibility";

/**
 * The normalised views of a spectrum (Feenstra with the settings' broadening, and setpoint), each its
 * values with the words saying what was done, or the reason it cannot be made.
 */
function viewsOf(input: ViewInput, settings: ExtractionSettings) {
  const one = (method: "feenstra" | "setpoint") => {
    try {
      const v = normaliseSpectrum(input, { ...settings.normalisation, method });
      return { values: Array.from(v.values), stderr: v.stderr ? Array.from(v.stderr) : null, description: v.description, warnings: v.warnings, error: null };
    } catch (e) {
      return { values: null, stderr: null, description: null, warnings: [], error: (e as Error).message };
    }
  };
  return { feenstra: one("feenstra"), setpoint: one("setpoint") };
}

/**
 * What the review screen draws beside the raw curve: the smoothed curve, noise floor, threshold
 * and resolution, recomputed with the settings version that made the stored pick (about a
 * millisecond for a 512-point spectrum), so nothing derivable is stored twice. They belong to the
 * view the pick was made on (`pickedOn`); the normalised views come along for the view switch.
 */
async function analysisOf(ctx: Ctx, s: typeof spectra.$inferSelect, settingsVersionId: string | null) {
  const [sv] = settingsVersionId ? await ctx.db.select().from(extractionSettingsVersions).where(eq(extractionSettingsVersions.id, settingsVersionId)) : [];
  const [session] = await ctx.db.select({ t: measurementSessions.temperatureK }).from(measurementSessions).where(eq(measurementSessions.id, s.sessionId));
  const settings = resolveExtractionSettings((sv?.settings ?? {}) as never);
  const meta = metaOfRow(s, session?.t);
  const input = { bias_V: s.biasV, didv: s.didv, current_A: s.currentA, stderr: s.stderr, meta };
  const { pick, view } = pickOnSettingsView(input, settings);
  return {
    pickedOn: view,
    views: viewsOf(input, settings),
    smoothed: Array.from(pick.smoothed),
    smoothing: pick.smoothing,
    noiseFloor: pick.noiseFloor,
    noiseSigma: pick.noiseSigma,
    threshold: pick.threshold,
    // The baseline the edges were read against (sloped or curved where the data showed it), and the
    // threshold's height above it, as the picker read them.
    baseline: pick.baseline ? Array.from(pick.baseline) : null,
    baselineDegree: pick.baselineDegree,
    thresholdOffset: pick.thresholdOffset,
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

/**
 * An average's members (each with its raw file's SHA-256, used or left out and why), and for a
 * member the average it is in.
 */
async function averageOf(ctx: Ctx, s: typeof spectra.$inferSelect) {
  const members =
    s.kind === "average"
      ? await ctx.db
          .select({
            id: spectra.id,
            sourceName: spectra.sourceName,
            index: spectra.indexInFile,
            label: spectra.label,
            rawSha256: spectra.rawSha256,
            used: spectrumAverageMembers.used,
            leftOutReason: spectrumAverageMembers.leftOutReason,
            statistic: spectrumAverageMembers.statistic,
            limit: spectrumAverageMembers.limit,
            putBack: spectrumAverageMembers.putBack,
          })
          .from(spectrumAverageMembers)
          .innerJoin(spectra, eq(spectra.id, spectrumAverageMembers.memberId))
          .where(and(eq(spectrumAverageMembers.averageId, s.id), eq(spectrumAverageMembers.labId, ctx.actor.labId)))
          .orderBy(spectrumAverageMembers.position)
      : [];
  const [into] = await ctx.db
    .select({ id: spectra.id, label: spectra.label })
    .from(spectrumAverageMembers)
    .innerJoin(spectra, eq(spectra.id, spectrumAverageMembers.averageId))
    .where(and(eq(spectrumAverageMembers.memberId, s.id), eq(spectrumAverageMembers.labId, ctx.actor.labId)));
  const used = members.filter((m) => m.used).length;
  return {
    average:
      s.kind === "average"
        ? {
            members,
            description:
              `mean of ${used} of ${members.length} repeats at one point, with the standard error of the mean` +
              (used < members.length ? `; ${members.length - used} left out (differs beyond the noise)` : ""),
          }
        : null,
    averagedInto: into ?? null,
  };
}

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
  const { average, averagedInto } = await averageOf(ctx, s);
  return {
    id: s.id,
    /** `measured` (a column of a file) or `average` (of repeats: `average` lists its members). */
    kind: s.kind,
    average,
    /** For a member of an average: that average (it stands for this spectrum in the fit). */
    averagedInto,
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
    arrays: {
      bias_V: Array.from(s.biasV),
      didv: Array.from(s.didv),
      current_A: s.currentA ? Array.from(s.currentA) : null,
      /** Standard error of the mean per point (averages). */
      stderr: s.stderr ? Array.from(s.stderr) : null,
    },
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
