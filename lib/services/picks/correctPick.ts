import "server-only";
import { eq } from "drizzle-orm";
import { gapPicks, pickHistory } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { correctPickInput } from "@/lib/schemas/picks";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { invalid } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { snapshot, lockPick, finish } from "./shared";

/** An analyst moves the band edges by hand. The automatic pick stays in auto_pick; the change goes to the history. */
export async function correctPick({ ctx, input }: { ctx: Ctx; input: { spectrumId: string; body: unknown } }) {
  assertCan(ctx.actor, "analysis:write");
  const b = parseInput(correctPickInput, input.body);
  const result = await ctx.db.transaction(async (tx) => {
    const { p, s } = await lockPick(tx, ctx, input.spectrumId, b.version);
    const lo = s.biasV[0];
    const hi = s.biasV[s.biasV.length - 1];
    if (b.vbEdge_V < lo || b.cbEdge_V > hi) throw invalid(`Both edges must lie within the measured bias range (${lo.toFixed(3)} to ${hi.toFixed(3)} V).`, { vbEdge_V: ["Outside the measured range."] });
    const resolution_eV = (p.resolutionMev ?? 0) / 1000;
    const gap = b.cbEdge_V - b.vbEdge_V;
    const auto = p.autoPick as { uncertainty_eV?: number | null };
    const [next] = await tx
      .update(gapPicks)
      .set({
        source: "corrected",
        status: "ok",
        vbEdgeV: b.vbEdge_V,
        cbEdgeV: b.cbEdge_V,
        gapEv: gap,
        midgapV: (b.vbEdge_V + b.cbEdge_V) / 2,
        // A hand-placed edge is no better than the energy resolution, nor than the automatic estimate.
        uncertaintyEv: Math.max(auto.uncertainty_eV ?? 0, resolution_eV / 2),
        closed: gap < resolution_eV,
        method: "manual",
        version: p.version + 1,
        updatedBy: ctx.actor.userId,
        updatedAt: new Date(),
      })
      .where(eq(gapPicks.id, p.id))
      .returning();
    await tx.insert(pickHistory).values({ labId: ctx.actor.labId, pickId: p.id, actorId: ctx.actor.userId, action: "correct", before: snapshot(p), after: snapshot(next), reason: b.reason });
    await recordAudit({ ...ctx, db: tx }, "pick.correct", { type: "spectrum", id: input.spectrumId }, { from: [p.vbEdgeV, p.cbEdgeV], to: [b.vbEdge_V, b.cbEdge_V] });
    return { pick: next, sampleId: s.sampleId };
  });
  const refit = await finish(ctx, result.sampleId);
  return { pick: result.pick, crossing: refit.current };
}
