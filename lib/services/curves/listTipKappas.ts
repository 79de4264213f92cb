import "server-only";
import { and, eq } from "drizzle-orm";
import { approachCurves, samples, type ApproachCurveRow } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { sampleVisibility } from "../samples/visibility";
import { kappaOf } from "./shared";

/**
 * The κ of each tip from its fitted I(z) curves, per sample it was measured on (the apparent
 * barrier belongs to the junction, tip and sample together): for the tips page. Only the samples
 * the actor may see count.
 */
export async function listTipKappas({ ctx }: { ctx: Ctx }) {
  assertCan(ctx.actor, "lab:read");
  const rows = await ctx.db
    .select({ c: approachCurves, sample: samples.name })
    .from(approachCurves)
    .innerJoin(samples, eq(samples.id, approachCurves.sampleId))
    .where(and(eq(approachCurves.labId, ctx.actor.labId), eq(approachCurves.fitStatus, "ok"), await sampleVisibility(ctx)));
  const groups = new Map<string, { tipId: string; sample: string; rows: ApproachCurveRow[] }>();
  for (const r of rows) {
    if (!r.c.tipId) continue;
    const key = `${r.c.tipId}:${r.c.sampleId}`;
    const g = groups.get(key) ?? { tipId: r.c.tipId, sample: r.sample, rows: [] };
    g.rows.push(r.c);
    groups.set(key, g);
  }
  return [...groups.values()].map((g) => {
    const k = kappaOf(g.rows)!;
    return { tipId: g.tipId, sample: g.sample, curves: k.curves, kappa_per_nm: k.kappa_per_nm, kappaSigma_per_nm: k.kappaSigma_per_nm, barrierHeight_eV: k.barrierHeight_eV, barrierHeightSigma_eV: k.barrierHeightSigma_eV };
  });
}
