import "server-only";
import { and, eq, inArray } from "drizzle-orm";
import { approachCurves, measurementSessions, tips, type StoredCurveChoice } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { invalid } from "@/lib/base/errors";
import { kappaOf } from "./shared";

export interface CurveChoiceInput {
  sampleId: string;
  scope: "session" | "tip" | "set";
  sessionId?: string;
  tipId?: string;
  curveIds?: string[];
}

/**
 * The fitted I(z) curves of a sample a field model takes κ from (one session's, one tip's on this
 * sample, or a chosen set) and their weighted κ, as the version records them. The sample is the
 * caller's, already checked visible. A choice with no fitted curve is a field error.
 */
export async function curvesForFieldModel({ ctx, input }: { ctx: Ctx; input: CurveChoiceInput }): Promise<StoredCurveChoice> {
  assertCan(ctx.actor, "analysis:write");
  const where = [eq(approachCurves.labId, ctx.actor.labId), eq(approachCurves.sampleId, input.sampleId)];
  if (input.scope === "session") where.push(eq(approachCurves.sessionId, input.sessionId ?? ""));
  if (input.scope === "tip") where.push(eq(approachCurves.tipId, input.tipId ?? ""));
  if (input.scope === "set") where.push(inArray(approachCurves.id, input.curveIds ?? []));
  const rows = await ctx.db
    .select({ c: approachCurves, date: measurementSessions.date, tip: tips.label })
    .from(approachCurves)
    .innerJoin(measurementSessions, eq(measurementSessions.id, approachCurves.sessionId))
    .leftJoin(tips, eq(tips.id, approachCurves.tipId))
    .where(and(...where));
  const k = kappaOf(rows.map((r) => r.c));
  const field = input.scope === "session" ? "curveSessionId" : input.scope === "tip" ? "curveTipId" : "curveIds";
  if (!k) {
    const message = rows.length
      ? "None of these I(z) curves could be fitted for κ."
      : "No I(z) curves of this sample match that choice.";
    throw invalid(message, { [field]: [message] });
  }
  const used = rows.filter((r) => r.c.fitStatus === "ok");
  const n = `${used.length} I(z) curve${used.length > 1 ? "s" : ""}`;
  const first = used[0];
  const description =
    input.scope === "session"
      ? `${n} of the session of ${first.date ?? "an unknown date"}${first.tip ? ` (${first.tip})` : ""}`
      : input.scope === "tip"
        ? `${n} taken with tip ${first.tip ?? "?"} on this sample`
        : `${n} chosen by hand`;
  return {
    scope: input.scope,
    sessionId: input.scope === "session" ? (input.sessionId ?? null) : null,
    tipId: input.scope === "tip" ? (input.tipId ?? null) : null,
    curveIds: used.map((r) => r.c.id),
    kappa_per_nm: k.kappa_per_nm,
    kappaSigma_per_nm: k.kappaSigma_per_nm,
    description,
  };
}
