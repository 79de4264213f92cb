import "server-only";
import { and, eq } from "drizzle-orm";
import { samples, tips } from "@/db/schema";
import { sessionInput } from "@/lib/schemas/lab";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";

/** The sample and tip named by a session must belong to the actor's lab. */
export async function checkRefs(ctx: Ctx, sampleId: string, tipId?: string) {
  const [s] = await ctx.db.select({ id: samples.id }).from(samples).where(and(eq(samples.id, sampleId), eq(samples.labId, ctx.actor.labId)));
  if (!s) throw notFound("sample");
  if (tipId) {
    const [t] = await ctx.db.select({ id: tips.id }).from(tips).where(and(eq(tips.id, tipId), eq(tips.labId, ctx.actor.labId)));
    if (!t) throw notFound("tip");
  }
}

export function values(data: ReturnType<typeof sessionInput.parse>) {
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
