import "server-only";
import { and, eq } from "drizzle-orm";
import { tips } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";

export async function getTip({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.id)) throw notFound("tip");
  const [row] = await ctx.db.select().from(tips).where(and(eq(tips.id, input.id), eq(tips.labId, ctx.actor.labId)));
  if (!row) throw notFound("tip");
  return row;
}
