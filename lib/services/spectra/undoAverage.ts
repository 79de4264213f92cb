import "server-only";
import { and, eq } from "drizzle-orm";
import { samples, spectra, spectrumAverageMembers } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { invalid, notFound } from "@/lib/base/errors";
import { refitSample } from "../analysis/refitSample";
import { recordAudit } from "../audit";
import { isUuid } from "../samples/getSample";
import { sampleVisibility } from "../samples/visibility";

/**
 * Undoes an average: the average spectrum (its pick and its member rows) is deleted, the members,
 * which were never changed, come back into the crossing fit, and the sample is refitted.
 */
export async function undoAverage({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "spectrum:tag");
  if (!isUuid(input.id)) throw notFound("spectrum");
  const visible = await sampleVisibility(ctx);
  const [row] = await ctx.db
    .select({ id: spectra.id, kind: spectra.kind, sampleId: spectra.sampleId })
    .from(spectra)
    .innerJoin(samples, eq(samples.id, spectra.sampleId))
    .where(and(eq(spectra.id, input.id), eq(spectra.labId, ctx.actor.labId), visible));
  if (!row) throw notFound("spectrum");
  if (row.kind !== "average") throw invalid("This spectrum is measured, not an average: there is nothing to undo.");
  const members = await ctx.db
    .select({ id: spectrumAverageMembers.memberId })
    .from(spectrumAverageMembers)
    .where(eq(spectrumAverageMembers.averageId, row.id))
    .orderBy(spectrumAverageMembers.position);
  await ctx.db.delete(spectra).where(eq(spectra.id, row.id));
  await recordAudit(ctx, "spectra.average.undo", { type: "spectrum", id: row.id }, { members: members.map((m) => m.id) });
  const refit = await refitSample({ ctx, input: { sampleId: row.sampleId } });
  return { members: members.map((m) => m.id), refit };
}
