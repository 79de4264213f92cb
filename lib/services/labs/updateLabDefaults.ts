import "server-only";
import { eq } from "drizzle-orm";
import { labs } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { labDefaultsInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";

export async function updateLabDefaults({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "lab:configure");
  const d = parseInput(labDefaultsInput, input);
  const [row] = await ctx.db
    .update(labs)
    .set({
      name: d.name,
      defaultTipWorkFunctionEv: d.defaultTipWorkFunction_eV,
      defaultTipWorkFunctionSigmaEv: d.defaultTipWorkFunctionSigma_eV,
      defaultSampleWorkFunctionEv: d.defaultSampleWorkFunction_eV,
      defaultSampleWorkFunctionSigmaEv: d.defaultSampleWorkFunctionSigma_eV,
    })
    .where(eq(labs.id, ctx.actor.labId))
    .returning();
  await recordAudit(ctx, "lab.defaults", { type: "lab", id: row.id }, d);
  return row;
}
