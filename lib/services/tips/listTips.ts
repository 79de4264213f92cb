import "server-only";
import { asc, eq } from "drizzle-orm";
import { tips } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";

export async function listTips({ ctx }: { ctx: Ctx }) {
  assertCan(ctx.actor, "lab:read");
  return ctx.db.select().from(tips).where(eq(tips.labId, ctx.actor.labId)).orderBy(asc(tips.label));
}
