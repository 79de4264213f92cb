import "server-only";
import type { Ctx } from "@/lib/base/context";
import { assertCan } from "@/lib/base/permissions";
import { newLabInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import { parseInput } from "../parse";
import { insertLab, ownerCtx } from "./shared";

/**
 * A signed-in member starts a new lab (the lab switcher's "New lab") and is its owner; the
 * defaults of its tips and samples come from the form. The lab and the membership are stored
 * together, and the creation is audited in the new lab.
 */
export async function createLab({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "lab:create");
  const data = parseInput(newLabInput, input);
  return ctx.db.transaction(async (tx) => {
    const lab = await insertLab(tx, data, ctx.actor.userId);
    const { userId, email, name, via } = ctx.actor;
    const from = { labSlug: ctx.actor.labSlug };
    await recordAudit(ownerCtx(tx, lab, { userId, email, name, via }), "lab.create", { type: "lab", id: lab.id }, from);
    return { id: lab.id, slug: lab.slug, name: lab.name };
  });
}
