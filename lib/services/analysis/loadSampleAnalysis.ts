import "server-only";
import { desc, eq } from "drizzle-orm";
import type { DbCtx } from "@/lib/base/context";
import { extractionSettingsVersions, fieldModelVersions, labs, samples, type StoredFieldModel, type Tip } from "@/db/schema";
import { resolveExtractionSettings, resolveFieldModel, type ExtractionSettings, type FieldModel } from "@/lib/spectra";
import { notFound } from "@/lib/base/errors";
import { initialVersionRows } from "../samples/initialVersions";

export interface SampleAnalysis {
  sample: typeof samples.$inferSelect;
  lab: typeof labs.$inferSelect;
  settingsVersion: { id: string; version: number };
  settings: ExtractionSettings;
  fieldVersion: { id: string; version: number };
  fieldStored: StoredFieldModel;
  /** The full field model for a spectrum measured with this tip (or the lab's default tip). */
  modelFor(tip: Pick<Tip, "workFunctionEv" | "workFunctionSigmaEv"> | null): FieldModel;
}

/** Everything the analysis of one sample needs, with the current settings and field-model versions. */
export async function loadSampleAnalysis({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<SampleAnalysis> {
  const { db } = ctx;
  const { sampleId } = input;
  const [row] = await db.select({ sample: samples, lab: labs }).from(samples).innerJoin(labs, eq(labs.id, samples.labId)).where(eq(samples.id, sampleId));
  if (!row) throw notFound("sample");
  let [sv] = await db.select().from(extractionSettingsVersions).where(eq(extractionSettingsVersions.sampleId, sampleId)).orderBy(desc(extractionSettingsVersions.version)).limit(1);
  let [fv] = await db.select().from(fieldModelVersions).where(eq(fieldModelVersions.sampleId, sampleId)).orderBy(desc(fieldModelVersions.version)).limit(1);
  if (!sv || !fv) {
    // A sample made before versions existed (or by hand) starts at version 1 of the defaults.
    const rows = initialVersionRows(row.sample.labId, sampleId, null);
    if (!sv) [sv] = await db.insert(extractionSettingsVersions).values(rows.settings).onConflictDoNothing().returning();
    if (!fv) [fv] = await db.insert(fieldModelVersions).values(rows.field).onConflictDoNothing().returning();
    if (!sv || !fv) return loadSampleAnalysis({ ctx, input });
  }
  const settings = resolveExtractionSettings(sv.settings as never);
  const fieldStored = fv.model as unknown as StoredFieldModel;
  const { sample, lab } = row;
  return {
    sample,
    lab,
    settingsVersion: { id: sv.id, version: sv.version },
    settings,
    fieldVersion: { id: fv.id, version: fv.version },
    fieldStored,
    modelFor(tip) {
      return resolveFieldModel({
        tipWorkFunction_eV: tip?.workFunctionEv ?? lab.defaultTipWorkFunctionEv,
        tipWorkFunctionSigma_eV: tip?.workFunctionSigmaEv ?? lab.defaultTipWorkFunctionSigmaEv,
        sampleWorkFunction_eV: sample.workFunctionEv,
        sampleWorkFunctionSigma_eV: sample.workFunctionSigmaEv,
        contactDistance_nm: fieldStored.contactDistance_nm,
        contactDistanceSigma_nm: fieldStored.contactDistanceSigma_nm,
        barrierHeight_eV: fieldStored.barrierHeight_eV,
        barrierHeightSigma_eV: fieldStored.barrierHeightSigma_eV ?? 0,
        assumedBarrierSigma_eV: fieldStored.assumedBarrierSigma_eV ?? 0,
        screening: fieldStored.screening,
      });
    },
  };
}
