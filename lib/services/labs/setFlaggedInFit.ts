import "server-only";
import { and, eq, sql } from "drizzle-orm";
import { gapPicks, labs, spectra } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { flaggedInFitInput } from "@/lib/schemas/lab";
import { queueRefit } from "../runs/queueRefit";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";

/**
 * Whether spectra whose automatic pick carries a quality flag enter the critical-field fit
 * (`include`, the default: they enter, marked on the plot) or not (`exclude`; corrected picks
 * enter either way). A change refits, in the background, every sample of the lab with a flagged
 * automatic pick (the others fit the same either way).
 */
export async function setFlaggedInFit({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "lab:configure");
  const { flaggedInFit } = parseInput(flaggedInFitInput, input);
  const [before] = await ctx.db.select({ v: labs.flaggedInFit }).from(labs).where(eq(labs.id, ctx.actor.labId));
  if (before?.v === flaggedInFit) return { flaggedInFit, changed: false, runIds: [] as string[] };
  await ctx.db.update(labs).set({ flaggedInFit }).where(eq(labs.id, ctx.actor.labId));
  await recordAudit(ctx, "lab.flagged-in-fit", { type: "lab", id: ctx.actor.labId }, { from: before?.v, to: flaggedInFit });
  const reason = flaggedInFit === "exclude" ? "lab setting: flagged spectra left out of the fit" : "lab setting: flagged spectra in the fit";
  // Only a sample with a flagged automatic pick fits differently under the other setting.
  const ids = await ctx.db
    .selectDistinct({ id: spectra.sampleId })
    .from(gapPicks)
    .innerJoin(spectra, eq(spectra.id, gapPicks.spectrumId))
    .where(and(eq(gapPicks.labId, ctx.actor.labId), eq(gapPicks.source, "auto"), sql`jsonb_array_length(${gapPicks.flags}) > 0`));
  const runIds: string[] = [];
  for (const s of ids) runIds.push((await queueRefit({ ctx, input: { sampleId: s.id, reason } })).id);
  return { flaggedInFit, changed: true, runIds };
}
