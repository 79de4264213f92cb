import "server-only";
import { and, eq, inArray } from "drizzle-orm";
import { samples, spectra, spectrumAverageMembers } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { averageSpectraInput } from "@/lib/schemas/uploads";
import type { Ctx } from "@/lib/base/context";
import { invalid, notFound } from "@/lib/base/errors";
import { refitSample } from "../analysis/refitSample";
import { storeAverage } from "../analysis/storeAverage";
import { recordAudit } from "../audit";
import { parseInput } from "../parse";
import { sampleVisibility } from "../samples/visibility";

/**
 * Averages selected spectra of one sample (repeats at one point: same setpoint and position within
 * a tolerance, same bias range) into a spectrum of kind `average` with its own automatic pick; a
 * repeat that differs beyond the noise is left out and said so. Spectra of two samples, an average,
 * or a spectrum already in an average are refused with the reason, and so are mismatched setpoints,
 * positions or bias ranges (lib/spectra `averageSpectra`); nothing is stored then. The members leave
 * the crossing fit while the average is in it, and the sample is refitted.
 */
export async function createAverage({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "spectrum:tag");
  const { ids, include } = parseInput(averageSpectraInput, input);
  if (new Set(ids).size !== ids.length) throw invalid("The same spectrum is selected twice.");
  const visible = await sampleVisibility(ctx);
  const rows = await ctx.db
    .select({ id: spectra.id, sampleId: spectra.sampleId, kind: spectra.kind, label: spectra.label, sourceName: spectra.sourceName, index: spectra.indexInFile })
    .from(spectra)
    .innerJoin(samples, eq(samples.id, spectra.sampleId))
    .where(and(inArray(spectra.id, ids), eq(spectra.labId, ctx.actor.labId), visible));
  if (rows.length !== ids.length) throw notFound("spectrum");
  const name = (r: (typeof rows)[number]) => `${r.sourceName} #${r.index}`;
  const sampleIds = [...new Set(rows.map((r) => r.sampleId))];
  if (sampleIds.length > 1) throw invalid("Spectra of two samples cannot be averaged: select repeats of one point of one sample.");
  const average = rows.find((r) => r.kind === "average");
  if (average) throw invalid(`${name(average)} is an average itself: average the measured repeats instead.`);
  const taken = await ctx.db.select({ memberId: spectrumAverageMembers.memberId }).from(spectrumAverageMembers).where(inArray(spectrumAverageMembers.memberId, ids));
  if (taken.length) {
    const r = rows.find((x) => x.id === taken[0].memberId)!;
    throw invalid(`${name(r)} is already in an average: undo that average first.`);
  }
  const stored = await ctx.db.transaction((tx) => storeAverage({ ctx: { db: tx }, input: { memberIds: ids, include, createdBy: ctx.actor.userId } }));
  await recordAudit(ctx, "spectra.average", { type: "spectrum", id: stored.id }, { members: ids, leftOut: stored.leftOut });
  const refit = await refitSample({ ctx, input: { sampleId: sampleIds[0] } });
  return { ...stored, refit };
}
