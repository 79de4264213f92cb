import "server-only";
import { samples } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { sampleInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, isUniqueViolation } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { subscribeLabDefaults } from "./subscribeLabDefaults";
import { ensureSampleVersions } from "./ensureSampleVersions";

export async function createSample({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "sample:write");
  const data = parseInput(sampleInput, input);
  try {
    const [row] = await ctx.db
      .insert(samples)
      .values({
        labId: ctx.actor.labId,
        name: data.name,
        material: data.material,
        substrate: data.substrate ?? null,
        workFunctionEv: data.workFunction_eV,
        workFunctionSigmaEv: data.workFunctionSigma_eV,
        notes: data.notes ?? null,
        createdBy: ctx.actor.userId,
      })
      .returning();
    await ensureSampleVersions({ ctx, input: { sampleId: row.id } });
    await subscribeLabDefaults({ ctx, input: { sampleId: row.id } });
    await recordAudit(ctx, "sample.create", { type: "sample", id: row.id }, { name: row.name });
    return row;
  } catch (e) {
    if (isUniqueViolation(e)) throw conflict(`A sample named "${data.name}" already exists in this lab.`);
    throw e;
  }
}
