import "server-only";
import { and, eq } from "drizzle-orm";
import { measurementSessions, samples, tips, users } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { sampleVisibility } from "../samples/visibility";

async function listSessionsWhere(ctx: Ctx, id: string) {
  const visible = await sampleVisibility(ctx);
  return ctx.db
    .select({ session: measurementSessions, sampleName: samples.name, tipLabel: tips.label, operatorName: users.name })
    .from(measurementSessions)
    .innerJoin(samples, eq(samples.id, measurementSessions.sampleId))
    .leftJoin(tips, eq(tips.id, measurementSessions.tipId))
    .leftJoin(users, eq(users.id, measurementSessions.operatorId))
    .where(and(eq(measurementSessions.id, id), eq(measurementSessions.labId, ctx.actor.labId), visible));
}

export async function getSession({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.id)) throw notFound("session");
  const rows = await listSessionsWhere(ctx, input.id);
  if (!rows[0]) throw notFound("session");
  return rows[0];
}
