import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { measurementSessions, tips } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";

/** The tips a sample was measured with (through its sessions), for the field model's assumptions. */
export async function tipsOfSample({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }) {
  assertCan(ctx.actor, "lab:read");
  return ctx.db
    .selectDistinct({ id: tips.id, label: tips.label, workFunctionEv: tips.workFunctionEv, workFunctionSigmaEv: tips.workFunctionSigmaEv })
    .from(tips)
    .innerJoin(measurementSessions, eq(measurementSessions.tipId, tips.id))
    .where(and(eq(measurementSessions.sampleId, input.sampleId), eq(tips.labId, ctx.actor.labId)))
    .orderBy(asc(tips.label));
}
