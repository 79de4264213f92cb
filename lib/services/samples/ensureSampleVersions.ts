import "server-only";
import { eq } from "drizzle-orm";
import { extractionSettingsVersions, fieldModelVersions } from "@/db/schema";
import { DEFAULT_EXTRACTION_SETTINGS, DEFAULT_FIELD_MODEL } from "@/lib/spectra/settings";
import type { Ctx } from "../context";

/**
 * Every sample starts with version 1 of its extraction settings and of its field model, holding
 * the analysis core's defaults (kept in one place, lib/spectra/settings.ts). The field model's work
 * functions are not stored here: they come from the sample and from each spectrum's tip.
 */
export async function ensureSampleVersions(ctx: Ctx, sampleId: string): Promise<void> {
  const [s] = await ctx.db.select({ id: extractionSettingsVersions.id }).from(extractionSettingsVersions).where(eq(extractionSettingsVersions.sampleId, sampleId)).limit(1);
  if (!s) {
    await ctx.db.insert(extractionSettingsVersions).values({
      labId: ctx.actor.labId,
      sampleId,
      version: 1,
      settings: { ...DEFAULT_EXTRACTION_SETTINGS } as Record<string, unknown>,
      note: "defaults",
      createdBy: ctx.actor.userId,
    });
  }
  const [f] = await ctx.db.select({ id: fieldModelVersions.id }).from(fieldModelVersions).where(eq(fieldModelVersions.sampleId, sampleId)).limit(1);
  if (!f) {
    const { contactDistance_nm, contactDistanceSigma_nm, barrierHeight_eV, screening } = DEFAULT_FIELD_MODEL;
    await ctx.db.insert(fieldModelVersions).values({
      labId: ctx.actor.labId,
      sampleId,
      version: 1,
      model: { contactDistance_nm, contactDistanceSigma_nm, barrierHeight_eV, screening },
      note: "defaults",
      createdBy: ctx.actor.userId,
    });
  }
}
