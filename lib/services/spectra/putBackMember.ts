import "server-only";
import { eq } from "drizzle-orm";
import { spectra, spectrumAverageMembers } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { putBackMemberInput } from "@/lib/schemas/uploads";
import type { Ctx } from "@/lib/base/context";
import { invalid, notFound } from "@/lib/base/errors";
import { refitSample } from "../analysis/refitSample";
import { storeAverage } from "../analysis/storeAverage";
import { recordAudit } from "../audit";
import { parseInput } from "../parse";
import { spectrumKindOf } from "./shared";

/**
 * Puts a repeat the odd-repeat test left out back into its average: the average is made again from
 * the same members with that one (and any put back before) kept in, as a new average spectrum in
 * one transaction, and the sample is refitted. Returns the new average's id.
 */
export async function putBackMember({ ctx, input }: { ctx: Ctx; input: { id: string; body: unknown } }) {
  assertCan(ctx.actor, "spectrum:tag");
  const { memberId } = parseInput(putBackMemberInput, input.body);
  const row = await spectrumKindOf(ctx, input.id);
  if (row.kind !== "average") throw notFound("average");
  const members = await ctx.db.select().from(spectrumAverageMembers).where(eq(spectrumAverageMembers.averageId, row.id)).orderBy(spectrumAverageMembers.position);
  const member = members.find((m) => m.memberId === memberId);
  if (!member) throw notFound("member of this average");
  if (member.used) throw invalid("That repeat is in the average already.");
  const include = [...members.filter((m) => m.putBack).map((m) => m.memberId), memberId];
  const stored = await ctx.db.transaction(async (tx) => {
    await tx.delete(spectra).where(eq(spectra.id, row.id));
    return storeAverage({ ctx: { db: tx }, input: { memberIds: members.map((m) => m.memberId), include, createdBy: ctx.actor.userId } });
  });
  await recordAudit(ctx, "spectra.average.put-back", { type: "spectrum", id: stored.id }, { replaces: row.id, member: memberId });
  const refit = await refitSample({ ctx, input: { sampleId: row.sampleId } });
  return { ...stored, refit };
}
