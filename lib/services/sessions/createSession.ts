import "server-only";
import { measurementSessions } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { sessionInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";
import { checkRefs, values } from "./shared";

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
