import "server-only";
import { tips } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { tipInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, isUniqueViolation } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { values } from "./shared";

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
