import "server-only";
import { and, desc, eq, sql } from "drizzle-orm";
import { measurementSessions, samples, tips, users } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { isUuid } from "../samples/getSample";
import { sampleVisibility } from "../samples/visibility";

export async function listSessions({ ctx, input }: { ctx: Ctx; input?: { sampleId?: string } }) {
  assertCan(ctx.actor, "lab:read");
  const visible = await sampleVisibility(ctx);
  return ctx.db
    .select({
      id: measurementSessions.id,
      label: measurementSessions.label,
      date: measurementSessions.date,
      instrument: measurementSessions.instrument,
      temperatureK: measurementSessions.temperatureK,
      sampleId: samples.id,
      sampleName: samples.name,
      tipId: tips.id,
      tipLabel: tips.label,
      operatorName: users.name,
      spectraCount: sql<number>`(select count(*)::int from spectra sp where sp.session_id = ${measurementSessions.id})`,
    })
    .from(measurementSessions)
    .innerJoin(samples, eq(samples.id, measurementSessions.sampleId))
    .leftJoin(tips, eq(tips.id, measurementSessions.tipId))
    .leftJoin(users, eq(users.id, measurementSessions.operatorId))
    .where(and(eq(measurementSessions.labId, ctx.actor.labId), visible, input?.sampleId && isUuid(input.sampleId) ? eq(samples.id, input.sampleId) : undefined))
    .orderBy(desc(measurementSessions.date), desc(measurementSessions.createdAt));
}
