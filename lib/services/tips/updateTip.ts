import "server-only";
import { and, eq } from "drizzle-orm";
import { spectra, tips } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { tipInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, isUniqueViolation, notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { isUuid } from "../samples/getSample";
import { queueReanalysis } from "../runs/queueReanalysis";
import { values } from "./shared";

export async function updateTip({ ctx, input }: { ctx: Ctx; input: { id: string; patch: unknown } }) {
  assertCan(ctx.actor, "tip:write");
  const data = parseInput(tipInput, input.patch);
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
