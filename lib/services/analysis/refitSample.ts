import "server-only";
import { and, eq, isNotNull, sql } from "drizzle-orm";
import type { DbCtx } from "@/lib/base/context";
import type { DbOrTx } from "@/db/client";
import { crossings, gapPicks, spectra, type Crossing } from "@/db/schema";
import { fitSweep, type CrossingFit } from "@/lib/spectra";
import { afterRefit } from "../alerts/afterRefit";
import { currentCrossing } from "../alerts/currentCrossing";
import { loadSampleAnalysis } from "./loadSampleAnalysis";
import { inFitByFlags, notInAverage, type RefitResult } from "./shared";

async function fitAndStore(db: DbOrTx, sampleId: string): Promise<RefitResult> {
  const analysis = await loadSampleAnalysis({ ctx: { db }, input: { sampleId } });
  const rows = await db
    .select({ field: spectra.fieldVPerNm, fieldSigma: spectra.fieldSigmaVPerNm, gap: gapPicks.gapEv, gapSigma: gapPicks.uncertaintyEv })
    .from(spectra)
    .innerJoin(gapPicks, eq(gapPicks.spectrumId, spectra.id))
    .where(and(eq(spectra.sampleId, sampleId), eq(gapPicks.excluded, false), eq(gapPicks.status, "ok"), isNotNull(spectra.fieldVPerNm), isNotNull(gapPicks.gapEv), inFitByFlags(analysis.lab.flaggedInFit), notInAverage));
  const fit = fitSweep(rows.map((r) => ({ field_V_per_nm: r.field!, fieldSigma_V_per_nm: r.fieldSigma, gap_eV: r.gap!, gapSigma_eV: r.gapSigma })));
  const previous = await currentCrossing({ ctx: { db }, input: { sampleId } });
  const ci = fit.ci95Total_V_per_nm ?? fit.ci95_V_per_nm;
  // A refit that changes nothing (a failed file, a tag that moves no point) keeps the current row:
  // the history of crossings records changes, not every time someone asked.
  if (
    previous &&
    previous.state === fit.state &&
    previous.nPoints === fit.n &&
    previous.fieldVPerNm === fit.field_V_per_nm &&
    previous.ci95LoVPerNm === (ci?.[0] ?? null) &&
    previous.ci95HiVPerNm === (ci?.[1] ?? null) &&
    previous.extrapolatedVPerNm === fit.extrapolated_V_per_nm &&
    previous.settingsVersionId === analysis.settingsVersion.id &&
    previous.fieldModelVersionId === analysis.fieldVersion.id
  ) {
    return { previous, current: previous, fit };
  }
  const [current] = await db
    .insert(crossings)
    .values({
      labId: analysis.sample.labId,
      sampleId,
      region: null,
      state: fit.state,
      found: fit.found,
      fieldVPerNm: fit.field_V_per_nm,
      ci95LoVPerNm: ci?.[0] ?? null,
      ci95HiVPerNm: ci?.[1] ?? null,
      slopeBelowEvPerVPerNm: fit.slopes?.below ?? null,
      slopeAboveEvPerVPerNm: fit.slopes?.above ?? null,
      extrapolatedVPerNm: fit.extrapolated_V_per_nm,
      nPoints: fit.n,
      comparison: { ...fit.comparison, statisticalCi95_V_per_nm: fit.ci95_V_per_nm } as Record<string, unknown>,
      curve: fit.curve,
      settingsVersionId: analysis.settingsVersion.id,
      fieldModelVersionId: analysis.fieldVersion.id,
      // A confirmation holds while the fit stays where it was confirmed.
      status: previous?.status === "confirmed" && sameCrossing(previous, fit) ? "confirmed" : "candidate",
      confirmedBy: previous?.status === "confirmed" && sameCrossing(previous, fit) ? previous.confirmedBy : null,
      confirmedAt: previous?.status === "confirmed" && sameCrossing(previous, fit) ? previous.confirmedAt : null,
    })
    .returning();
  return { previous: previous ?? null, current, fit };
}

/**
 * Refits a sample's gap versus field over its included spectra and stores the result as its
 * current crossing, then decides the crossing alerts for it (lib/services/alerts/afterRefit.ts).
 * Spectra whose automatic pick carries a quality flag enter unless the lab's setting says
 * `exclude` (`flaggedOutOfFit`); corrected picks always enter, an analyst has looked at them.
 */
export async function refitSample({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<RefitResult> {
  const { sampleId } = input;
  const result = await ctx.db.transaction(async (tx) => {
    // One refit of a sample at a time (across every process): each reads all that was committed
    // before it took the lock, so the newest crossing row always covers the newest data.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`refit:${sampleId}`}, 0))`);
    return fitAndStore(tx, sampleId);
  });
  // Every refit ends here, so no caller can skip the crossing alerts (found, moved): see afterRefit.
  await afterRefit({ ctx, input: { sampleId } });
  return result;
}

/** A new fit keeps a confirmation while its field stays inside the confirmed crossing's 95% interval. */
function sameCrossing(prev: Crossing, fit: CrossingFit): boolean {
  if (prev.state !== fit.state || fit.field_V_per_nm == null || prev.ci95LoVPerNm == null || prev.ci95HiVPerNm == null) return false;
  return fit.field_V_per_nm >= prev.ci95LoVPerNm && fit.field_V_per_nm <= prev.ci95HiVPerNm;
}
