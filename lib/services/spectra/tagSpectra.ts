import "server-only";
import { and, eq, inArray } from "drizzle-orm";
import { spectra, tips } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { tagSpectraInput } from "@/lib/schemas/uploads";
import { fieldFor } from "../analysis/analyzeSpectrum";
import { refitSample } from "../analysis/refitSample";
import { loadSampleAnalysis } from "../analysis/loadSampleAnalysis";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";

/**
 * Inline or bulk tagging of spectra: region, setpoint, z offset and tip. Changing anything the
 * distance depends on re-estimates distance and field at once, in the same transaction, and the
 * affected samples are refitted.
 */
export async function tagSpectra({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "spectrum:tag");
  const { ids, patch } = parseInput(tagSpectraInput, input);
  const rows = await ctx.db.select().from(spectra).where(and(inArray(spectra.id, ids), eq(spectra.labId, ctx.actor.labId)));
  if (rows.length !== new Set(ids).size) throw notFound("spectrum");
  if (patch.tipId) {
    const [t] = await ctx.db.select({ id: tips.id }).from(tips).where(and(eq(tips.id, patch.tipId), eq(tips.labId, ctx.actor.labId)));
    if (!t) throw notFound("tip");
  }
  const sampleIds = [...new Set(rows.map((r) => r.sampleId))];
  const analyses = new Map(await Promise.all(sampleIds.map(async (id) => [id, await loadSampleAnalysis({ ctx, input: { sampleId: id } })] as const)));
  const tipRows = await ctx.db.select().from(tips).where(eq(tips.labId, ctx.actor.labId));
  const tipById = new Map(tipRows.map((t) => [t.id, t]));

  await ctx.db.transaction(async (tx) => {
    for (const r of rows) {
      const next = {
        region: patch.region !== undefined ? patch.region || null : r.region,
        setpointBiasV: patch.setpointBias_V !== undefined ? patch.setpointBias_V : r.setpointBiasV,
        setpointCurrentA: patch.setpointCurrent_A !== undefined ? patch.setpointCurrent_A : r.setpointCurrentA,
        zOffsetPm: patch.zOffset_pm !== undefined ? patch.zOffset_pm : r.zOffsetPm,
        tipId: patch.tipId !== undefined ? patch.tipId : r.tipId,
      };
      const a = analyses.get(r.sampleId)!;
      const field = fieldFor(a.modelFor(next.tipId ? (tipById.get(next.tipId) ?? null) : null), {
        setpoint_bias_V: next.setpointBiasV ?? undefined,
        setpoint_current_A: next.setpointCurrentA ?? undefined,
        z_offset_pm: next.zOffsetPm ?? undefined,
      });
      const { warning: _w, ...fieldCols } = field;
      await tx.update(spectra).set({ ...next, ...fieldCols, fieldModelVersionId: a.fieldVersion.id, updatedAt: new Date() }).where(eq(spectra.id, r.id));
    }
  });
  await recordAudit(ctx, "spectra.tag", { type: "spectra", id: ids.length === 1 ? ids[0] : null }, { count: ids.length, fields: Object.keys(patch) });
  const refits = [];
  for (const id of sampleIds) refits.push(await refitSample({ ctx, input: { sampleId: id } }));
  return { updated: rows.length, refits };
}

