import "server-only";
import { asc, eq } from "drizzle-orm";
import { approachCurves } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { getSession } from "../sessions/getSession";
import { curveView, kappaOf } from "./shared";

/**
 * A session's I(z) approach curves with the fit of each (κ, σκ, φ_ap, the points used and why the
 * others were left out), and their weighted κ: `GET /api/v1/sessions/{id}/barrier` and the session's
 * I(z) page. `withData` adds each curve's z, current and per-point status (for the plots).
 */
export async function getSessionBarrier({ ctx, input }: { ctx: Ctx; input: { sessionId: string; withData?: boolean } }) {
  assertCan(ctx.actor, "lab:read");
  const s = await getSession({ ctx, input: { id: input.sessionId } });
  const rows = await ctx.db
    .select()
    .from(approachCurves)
    .where(eq(approachCurves.sessionId, s.session.id))
    .orderBy(asc(approachCurves.sourceName), asc(approachCurves.indexInFile));
  const k = kappaOf(rows);
  return {
    sessionId: s.session.id,
    sampleId: s.session.sampleId,
    tip: s.session.tipId ? { id: s.session.tipId, label: s.tipLabel } : null,
    curves: rows.map((r) => curveView(r, input.withData ?? false)),
    /** The fitted curves' κ averaged with weights 1/σ² (their spread added), φ_ap from it; null when none. */
    summary: k && {
      kappa_per_nm: k.kappa_per_nm,
      kappaSigma_per_nm: k.kappaSigma_per_nm,
      barrierHeight_eV: k.barrierHeight_eV,
      barrierHeightSigma_eV: k.barrierHeightSigma_eV,
      curves: k.curves,
    },
  };
}
