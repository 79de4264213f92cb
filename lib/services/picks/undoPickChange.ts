import "server-only";
import { and, desc, eq, ne } from "drizzle-orm";
import { gapPicks, pickHistory } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { undoInput } from "@/lib/schemas/picks";
import type { Ctx } from "@/lib/base/context";
import { conflict } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { snapshot, lockPick, finish } from "./shared";

type Snapshot = ReturnType<typeof snapshot>;

/** Undo the latest change to a pick: its state before that change comes back, and the undo is itself recorded. */
export async function undoPickChange({ ctx, input }: { ctx: Ctx; input: { spectrumId: string; body: unknown } }) {
  assertCan(ctx.actor, "analysis:write");
  const b = parseInput(undoInput, input.body);
  const result = await ctx.db.transaction(async (tx) => {
    const { p, s } = await lockPick(tx, ctx, input.spectrumId, b.version);
    // An acceptance changed nothing, so there is nothing of it to undo: the latest change is undone.
    const [last] = await tx.select().from(pickHistory).where(and(eq(pickHistory.pickId, p.id), ne(pickHistory.action, "accept"))).orderBy(desc(pickHistory.createdAt)).limit(1);
    if (!last) throw conflict("There is nothing to undo: this pick was never changed by hand.");
    const before = last.before as Snapshot;
    const [next] = await tx
      .update(gapPicks)
      .set({
        source: before.source,
        status: before.status,
        vbEdgeV: before.vbEdgeV,
        cbEdgeV: before.cbEdgeV,
        gapEv: before.gapEv,
        midgapV: before.midgapV,
        uncertaintyEv: before.uncertaintyEv,
        closed: before.closed,
        excluded: before.excluded,
        excludedReason: before.excludedReason,
        method: before.source === "auto" ? String((p.autoPick as { method?: string }).method ?? p.method) : "manual",
        version: p.version + 1,
        updatedBy: ctx.actor.userId,
        updatedAt: new Date(),
      })
      .where(eq(gapPicks.id, p.id))
      .returning();
    await tx.insert(pickHistory).values({ labId: ctx.actor.labId, pickId: p.id, actorId: ctx.actor.userId, action: "undo", before: snapshot(p), after: snapshot(next), reason: `undo of "${last.action}"` });
    return { pick: next, sampleId: s.sampleId };
  });
  const refit = await finish(ctx, result.sampleId);
  return { pick: result.pick, crossing: refit.current };
}
