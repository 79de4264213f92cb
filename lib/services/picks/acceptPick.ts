import "server-only";
import { eq } from "drizzle-orm";
import { gapPicks, pickHistory } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { acceptInput } from "@/lib/schemas/picks";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";
import { snapshot, lockPick } from "./shared";

/**
 * An analyst accepts a pick as it is (keyboard review's A): the history records who accepted which
 * version and when; nothing about the pick changes, so there is no refit. A stale version is a 409
 * like any edit. The pick's updated_at moves, so the phase data (which counts accepted picks) is
 * built afresh.
 */
export async function acceptPick({ ctx, input }: { ctx: Ctx; input: { spectrumId: string; body: unknown } }) {
  assertCan(ctx.actor, "analysis:write");
  const b = parseInput(acceptInput, input.body);
  return ctx.db.transaction(async (tx) => {
    const { p } = await lockPick(tx, ctx, input.spectrumId, b.version);
    const [next] = await tx.update(gapPicks).set({ updatedAt: new Date() }).where(eq(gapPicks.id, p.id)).returning();
    const [entry] = await tx.insert(pickHistory).values({ labId: ctx.actor.labId, pickId: p.id, actorId: ctx.actor.userId, action: "accept", before: snapshot(p), after: snapshot(next), reason: null }).returning();
    await recordAudit({ ...ctx, db: tx }, "pick.accept", { type: "spectrum", id: input.spectrumId }, { version: p.version });
    return { pick: next, acceptedAt: entry.createdAt };
  });
}
