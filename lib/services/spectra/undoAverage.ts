import "server-only";
import { eq } from "drizzle-orm";
import { spectra, spectrumAverageMembers } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { invalid, notFound } from "@/lib/base/errors";
import { refitSample } from "../analysis/refitSample";
import { recordAudit } from "../audit";
import { spectrumKindOf } from "./shared";

/**
 * Undoes an average: the average spectrum (its pick and its member rows) is deleted, the members,
 * which were never changed, come back into the crossing fit, and the sample is refitted.
 */
export async function undoAverage({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "spectrum:tag");
  const row = await spectrumKindOf(ctx, input.id);
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
