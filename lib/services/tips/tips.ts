import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { measurementSessions, spectra, tips } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { tipInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, isUniqueViolation, notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { isUuid } from "../samples/getSample";
import { queueReanalysis } from "../analysis/versions";

function values(data: ReturnType<typeof tipInput.parse>) {
  return {
    label: data.label,
    material: data.material,
    workFunctionEv: data.workFunction_eV,
    workFunctionSigmaEv: data.workFunctionSigma_eV,
    preparedOn: data.preparedOn ?? null,
    notes: data.notes ?? null,
  };
}

export async function listTips({ ctx }: { ctx: Ctx }) {
  assertCan(ctx.actor, "lab:read");
  return ctx.db.select().from(tips).where(eq(tips.labId, ctx.actor.labId)).orderBy(asc(tips.label));
}

export async function getTip({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.id)) throw notFound("tip");
  const [row] = await ctx.db.select().from(tips).where(and(eq(tips.id, input.id), eq(tips.labId, ctx.actor.labId)));
  if (!row) throw notFound("tip");
  return row;
}

export async function createTip({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "tip:write");
  const data = parseInput(tipInput, input);
  try {
    const [row] = await ctx.db
      .insert(tips)
      .values({ labId: ctx.actor.labId, createdBy: ctx.actor.userId, ...values(data) })
      .returning();
    await recordAudit(ctx, "tip.create", { type: "tip", id: row.id }, { label: row.label });
    return row;
  } catch (e) {
    if (isUniqueViolation(e)) throw conflict(`A tip labelled "${data.label}" already exists in this lab.`);
    throw e;
  }
}

export async function updateTip({ ctx, input }: { ctx: Ctx; input: { id: string; data: unknown } }) {
  assertCan(ctx.actor, "tip:write");
  const data = parseInput(tipInput, input.data);
  if (!isUuid(input.id)) throw notFound("tip");
  const [before] = await ctx.db.select().from(tips).where(and(eq(tips.id, input.id), eq(tips.labId, ctx.actor.labId)));
  if (!before) throw notFound("tip");
  try {
    const [row] = await ctx.db
      .update(tips)
      .set({ ...values(data), updatedAt: new Date() })
      .where(and(eq(tips.id, input.id), eq(tips.labId, ctx.actor.labId)))
      .returning();
    if (!row) throw notFound("tip");
    await recordAudit(ctx, "tip.update", { type: "tip", id: row.id });
    // Spectra measured with this tip estimate their field from its work function.
    if (before.workFunctionEv !== row.workFunctionEv || before.workFunctionSigmaEv !== row.workFunctionSigmaEv) {
      const used = await ctx.db.selectDistinct({ sampleId: spectra.sampleId }).from(spectra).where(eq(spectra.tipId, row.id));
      for (const u of used) await queueReanalysis({ ctx, input: { sampleId: u.sampleId, reason: `tip ${row.label} work function changed` } });
    }
    return row;
  } catch (e) {
    if (isUniqueViolation(e)) throw conflict(`A tip labelled "${data.label}" already exists in this lab.`);
    throw e;
  }
}

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
