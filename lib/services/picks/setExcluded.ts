import "server-only";
import { eq } from "drizzle-orm";
import { gapPicks, pickHistory } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { excludeInput } from "@/lib/schemas/picks";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";
import { snapshot, lockPick, finish } from "./shared";

/** Exclude a spectrum from the fit (tip change, drift…) or include it again, with a reason. */
export async function setExcluded({ ctx, input }: { ctx: Ctx; input: { spectrumId: string; body: unknown } }) {
  assertCan(ctx.actor, "analysis:write");
  const b = parseInput(excludeInput, input.body);
  const result = await ctx.db.transaction(async (tx) => {
    const { p, s } = await lockPick(tx, ctx, input.spectrumId, b.version);
    const [next] = await tx
      .update(gapPicks)
      .set({ excluded: b.excluded, excludedReason: b.excluded ? b.reason : null, version: p.version + 1, updatedBy: ctx.actor.userId, updatedAt: new Date() })
      .where(eq(gapPicks.id, p.id))
      .returning();
    await tx.insert(pickHistory).values({ labId: ctx.actor.labId, pickId: p.id, actorId: ctx.actor.userId, action: b.excluded ? "exclude" : "include", before: snapshot(p), after: snapshot(next), reason: b.reason });
    return { pick: next, sampleId: s.sampleId };
  });
  const refit = await finish(ctx, result.sampleId);
  return { pick: result.pick, crossing: refit.current };
}
