import "server-only";
import { and, asc, desc, eq, isNull, sql } from "drizzle-orm";
import { crossings, extractionSettingsVersions, fieldModelVersions, gapPicks, spectra } from "@/db/schema";
import { flaggedOutOfFit, notInAverage } from "../analysis/shared";
import type { Ctx } from "@/lib/base/context";
import { kappaSourceText, sharedField, type KappaSourceOf } from "@/lib/spectra";
import { getSample } from "../samples/getSample";
import { labFlaggedInFit } from "./labFlaggedInFit";
import { PhasePoint } from "./types";

/** x to n significant digits. */
function sigDigits(x: number, n: number): number {
  return x === 0 || !Number.isFinite(x) ? x : Number(x.toPrecision(n));
}

/** x to d decimals. */
function roundTo(x: number, d: number): number {
  const f = 10 ** d;
  return Math.round(x * f) / f;
}

/**
 * The phase plot's data: every spectrum with a gap and a field (an average in its members' place),
 * and the sample's current crossing.
 */
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
    .where(and(eq(spectra.sampleId, sample.id), eq(gapPicks.status, "ok"), sql`${spectra.fieldVPerNm} is not null`, sql`${gapPicks.gapEv} is not null`, notInAverage))
    .orderBy(asc(spectra.fieldVPerNm));
  const setting = await labFlaggedInFit({ ctx });
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
    .select({ c: crossings, settingsVersion: extractionSettingsVersions.version, fieldModelVersion: fieldModelVersions.version, fieldModel: fieldModelVersions.model })
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
          /** Where the field model of the fit took κ from, in words. */
          kappaSource: row.fieldModel ? kappaSourceText(row.fieldModel as KappaSourceOf) : null,
          fittedAt: c.createdAt.toISOString(),
        }
      : { state: "none" as const, found: false, field_V_per_nm: null, ci95_V_per_nm: null },
  };
}
