import "server-only";
import { formatUtc } from "@/lib/format";
import { and, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { gapPicks, spectra, users, type GapPickRow } from "@/db/schema";
import { refitSample } from "../analysis/refitSample";
import type { Ctx } from "@/lib/base/context";
import { conflict, notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";

/** What a history entry records of a pick, before and after a change. */
export function snapshot(p: GapPickRow) {
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

/**
 * Loads a spectrum's pick for change, locked, and checks the caller edited the version that is
 * current. A stale edit gets 409 naming who changed it and when, so the analyst can re-apply.
 */
export async function lockPick(tx: DbOrTx, ctx: Ctx, spectrumId: string, version: number) {
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
    throw conflict(`This pick was changed by ${by} at ${formatUtc(row.p.updatedAt)} (now version ${row.p.version}; you edited version ${version}). Your edit is kept: look at the new pick and save again.`, {
      currentVersion: row.p.version,
      updatedBy: by,
      updatedAt: row.p.updatedAt.toISOString(),
      current: snapshot(row.p),
    });
  }
  return row;
}

/** Refits the sample (which also decides its crossing alerts). */
export async function finish(ctx: Ctx, sampleId: string) {
  return refitSample({ ctx, input: { sampleId } });
}
