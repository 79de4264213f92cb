import "server-only";
import { and, desc, eq, ne } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { gapPicks, pickHistory, spectra, users, type GapPickRow } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { acceptInput, correctPickInput, excludeInput, undoInput } from "@/lib/schemas/picks";
import { refitSample } from "../analysis/refitSample";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, invalid, notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { isUuid } from "../samples/getSample";
import { assertSampleVisible } from "../samples/visibility";

/** What a history entry records of a pick, before and after a change. */
function snapshot(p: GapPickRow) {
  return {
    version: p.version,
    source: p.source,
    vbEdgeV: p.vbEdgeV,
    cbEdgeV: p.cbEdgeV,
    gapEv: p.gapEv,
    midgapV: p.midgapV,
    uncertaintyEv: p.uncertaintyEv,
    closed: p.closed,
    status: p.status,
    excluded: p.excluded,
    excludedReason: p.excludedReason,
  };
}
type Snapshot = ReturnType<typeof snapshot>;

/**
 * Loads a spectrum's pick for change, locked, and checks the caller edited the version that is
 * current. A stale edit gets 409 naming who changed it and when, so the analyst can re-apply.
 */
async function lockPick(tx: DbOrTx, ctx: Ctx, spectrumId: string, version: number) {
  if (!isUuid(spectrumId)) throw notFound("spectrum");
  const [row] = await tx
    .select({ p: gapPicks, s: { id: spectra.id, sampleId: spectra.sampleId, biasV: spectra.biasV } })
    .from(gapPicks)
    .innerJoin(spectra, eq(spectra.id, gapPicks.spectrumId))
    .where(and(eq(gapPicks.spectrumId, spectrumId), eq(gapPicks.labId, ctx.actor.labId)))
    .for("update", { of: gapPicks });
  if (!row) throw notFound("spectrum");
  if (row.p.version !== version) {
    const [who] = row.p.updatedBy ? await tx.select({ name: users.name }).from(users).where(eq(users.id, row.p.updatedBy)) : [];
    const by = who?.name ?? "the automatic re-analysis";
    throw conflict(`This pick was changed by ${by} at ${row.p.updatedAt.toISOString().replace("T", " ").slice(0, 16)} UTC (now version ${row.p.version}; you edited version ${version}). Your edit is kept: look at the new pick and save again.`, {
      currentVersion: row.p.version,
      updatedBy: by,
      updatedAt: row.p.updatedAt.toISOString(),
      current: snapshot(row.p),
    });
  }
  return row;
}

/** Refits the sample (which also decides its crossing alerts). */
async function finish(ctx: Ctx, sampleId: string) {
  return refitSample({ ctx, input: { sampleId } });
}

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
