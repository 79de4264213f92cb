import "server-only";
import { and, eq } from "drizzle-orm";
import { samples } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { samplePatch } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, isUniqueViolation, notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { queueReanalysis } from "../runs/queueReanalysis";
import { isUuid } from "./getSample";

export async function updateSample({ ctx, input }: { ctx: Ctx; input: { id: string; patch: unknown } }) {
  assertCan(ctx.actor, "sample:write");
  const data = parseInput(samplePatch, input.patch);
  const [before] = isUuid(input.id) ? await ctx.db.select().from(samples).where(and(eq(samples.id, input.id), eq(samples.labId, ctx.actor.labId))) : [];
  if (!before) throw notFound("sample");
  try {
    const [row] = await ctx.db
      .update(samples)
      .set({
        ...(data.name !== undefined && { name: data.name }),
        ...(data.material !== undefined && { material: data.material }),
        ...("substrate" in data && { substrate: data.substrate ?? null }),
        ...(data.workFunction_eV !== undefined && { workFunctionEv: data.workFunction_eV }),
        ...(data.workFunctionSigma_eV !== undefined && { workFunctionSigmaEv: data.workFunctionSigma_eV }),
        ...("notes" in data && { notes: data.notes ?? null }),
        updatedAt: new Date(),
      })
      .where(and(eq(samples.id, input.id), eq(samples.labId, ctx.actor.labId)))
      .returning();
    if (!row) throw notFound("sample");
    await recordAudit(ctx, "sample.update", { type: "sample", id: row.id }, { fields: Object.keys(data) });
    // The sample's work function is part of every field estimate: re-estimate them.
    if (row.workFunctionEv !== before.workFunctionEv || row.workFunctionSigmaEv !== before.workFunctionSigmaEv) await queueReanalysis({ ctx, input: { sampleId: row.id, reason: "sample work function changed" } });
    return row;
  } catch (e) {
    if (isUniqueViolation(e)) throw conflict(`A sample with that name already exists in this lab.`);
    throw e;
  }
}
