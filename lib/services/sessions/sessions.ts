import "server-only";
import { and, desc, eq, sql } from "drizzle-orm";
import { measurementSessions, samples, tips, users } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { sessionInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { isUuid } from "../samples/getSample";
import { sampleVisibility } from "../samples/visibility";

/** The sample and tip named by a session must belong to the actor's lab. */
async function checkRefs(ctx: Ctx, sampleId: string, tipId?: string) {
  const [s] = await ctx.db.select({ id: samples.id }).from(samples).where(and(eq(samples.id, sampleId), eq(samples.labId, ctx.actor.labId)));
  if (!s) throw notFound("sample");
  if (tipId) {
    const [t] = await ctx.db.select({ id: tips.id }).from(tips).where(and(eq(tips.id, tipId), eq(tips.labId, ctx.actor.labId)));
    if (!t) throw notFound("tip");
  }
}

function values(data: ReturnType<typeof sessionInput.parse>) {
  return {
    sampleId: data.sampleId,
    tipId: data.tipId ?? null,
    label: data.label,
    date: data.date,
    instrument: data.instrument ?? null,
    temperatureK: data.temperature_K ?? null,
    notes: data.notes ?? null,
  };
}

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

export async function getSession({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.id)) throw notFound("session");
  const rows = await listSessionsWhere(ctx, input.id);
  if (!rows[0]) throw notFound("session");
  return rows[0];
}

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

export async function createSession({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "session:write");
  const data = parseInput(sessionInput, input);
  await checkRefs(ctx, data.sampleId, data.tipId);
  const [row] = await ctx.db
    .insert(measurementSessions)
    .values({ labId: ctx.actor.labId, operatorId: ctx.actor.userId, createdBy: ctx.actor.userId, ...values(data) })
    .returning();
  await recordAudit(ctx, "session.create", { type: "session", id: row.id }, { label: row.label });
  return row;
}

export async function updateSession({ ctx, input }: { ctx: Ctx; input: { id: string; data: unknown } }) {
  assertCan(ctx.actor, "session:write");
  const data = parseInput(sessionInput, input.data);
  if (!isUuid(input.id)) throw notFound("session");
  await checkRefs(ctx, data.sampleId, data.tipId);
  const [row] = await ctx.db
    .update(measurementSessions)
    .set({ ...values(data), updatedAt: new Date() })
    .where(and(eq(measurementSessions.id, input.id), eq(measurementSessions.labId, ctx.actor.labId)))
    .returning();
  if (!row) throw notFound("session");
  await recordAudit(ctx, "session.update", { type: "session", id: row.id });
  return row;
}
