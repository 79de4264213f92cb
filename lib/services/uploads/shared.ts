import "server-only";
import { and, eq, ne } from "drizzle-orm";
import { measurementSessions, uploads } from "@/db/schema";
import { BarrierFitError, fitBarrier, type ParsedCurve } from "@/lib/spectra";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { assertSampleVisible } from "../samples/visibility";

import type { DbOrTx } from "@/db/client";
import { refitSample } from "../analysis/refitSample";
import type { RefitResult } from "../analysis/shared";

/** An upload of the actor's lab, whose session's sample the actor may see (collaborators may be limited to chosen samples). */
export async function loadUpload(ctx: Ctx, id: string) {
  if (!isUuid(id)) throw notFound("upload");
  const [row] = await ctx.db
    .select({ u: uploads, sampleId: measurementSessions.sampleId })
    .from(uploads)
    .innerJoin(measurementSessions, eq(measurementSessions.id, uploads.sessionId))
    .where(and(eq(uploads.id, id), eq(uploads.labId, ctx.actor.labId)));
  if (!row) throw notFound("upload");
  await assertSampleVisible(ctx, row.sampleId, "upload");
  return row.u;
}


export type ProcessOutcome =
  | { status: "done"; spectra: number; curves: number; refit: RefitResult }
  | { status: "failed"; message: string }
  | { status: "skipped"; reason: string };

/** Marks the file failed with its message; `retryable` when processing it again can help (not a file that cannot be read). */
export async function fail(db: DbOrTx, id: string, message: string, retryable = false): Promise<ProcessOutcome> {
  const [u] = await db
    .update(uploads)
    .set({ status: "failed", message, retryable, updatedAt: new Date() })
    .where(and(eq(uploads.id, id), ne(uploads.status, "done")))
    .returning({ sessionId: uploads.sessionId });
  if (!u) return { status: "skipped", reason: "already done by another run" };
  // The sample's alerts wait while any of its files is in flight; this one no longer is, so refit
  // (nothing changed in the data) to let the decision be made if it was the last.
  const [session] = await db.select({ sampleId: measurementSessions.sampleId }).from(measurementSessions).where(eq(measurementSessions.id, u.sessionId));
  if (session) await refitSample({ ctx: { db }, input: { sampleId: session.sampleId } });
  return { status: "failed", message };
}

/** The columns of one I(z) curve's fit, or its message when it cannot be fitted (stored either way). */
export function curveFitColumns(c: ParsedCurve) {
  try {
    const f = fitBarrier(c);
    return {
      fitStatus: "ok" as const,
      fitMessage: null,
      kappaPerNm: f.kappa_per_nm,
      kappaSigmaPerNm: f.kappaSigma_per_nm,
      barrierHeightEv: f.barrierHeight_eV,
      barrierHeightSigmaEv: f.barrierHeightSigma_eV,
      pointsUsed: f.pointsUsed,
      flags: f.flags,
      sweeps: f.sweeps.map(({ warnings: _w, curvature: _c, ...rest }) => rest),
      pointStatus: Array.from(f.status),
      warnings: [...c.warnings, ...f.warnings],
    };
  } catch (e) {
    if (!(e instanceof BarrierFitError)) throw e;
    return {
      fitStatus: "error" as const,
      fitMessage: e.message,
      kappaPerNm: null,
      kappaSigmaPerNm: null,
      barrierHeightEv: null,
      barrierHeightSigmaEv: null,
      pointsUsed: null,
      flags: [],
      sweeps: [],
      pointStatus: [],
      warnings: c.warnings,
    };
  }
}
