import "server-only";
import { and, eq } from "drizzle-orm";
import { measurementSessions } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { sessionInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { isUuid } from "../samples/getSample";
import { checkRefs, values } from "./shared";

export async function updateSession({ ctx, input }: { ctx: Ctx; input: { id: string; patch: unknown } }) {
  assertCan(ctx.actor, "session:write");
  const data = parseInput(sessionInput, input.patch);
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
