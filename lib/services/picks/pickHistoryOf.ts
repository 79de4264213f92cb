import "server-only";
import { and, desc, eq } from "drizzle-orm";
import { gapPicks, pickHistory, spectra, users } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { assertSampleVisible } from "../samples/visibility";

export async function pickHistoryOf({ ctx, input }: { ctx: Ctx; input: { spectrumId: string } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.spectrumId)) throw notFound("spectrum");
  const [s] = await ctx.db.select({ sampleId: spectra.sampleId }).from(spectra).where(and(eq(spectra.id, input.spectrumId), eq(spectra.labId, ctx.actor.labId)));
  if (!s) throw notFound("spectrum");
  await assertSampleVisible(ctx, s.sampleId, "spectrum");
  return ctx.db
    .select({ id: pickHistory.id, action: pickHistory.action, before: pickHistory.before, after: pickHistory.after, reason: pickHistory.reason, at: pickHistory.createdAt, actorName: users.name })
    .from(pickHistory)
    .innerJoin(gapPicks, eq(gapPicks.id, pickHistory.pickId))
    .leftJoin(users, eq(users.id, pickHistory.actorId))
    .where(and(eq(gapPicks.spectrumId, input.spectrumId), eq(pickHistory.labId, ctx.actor.labId)))
    .orderBy(desc(pickHistory.createdAt));
}
