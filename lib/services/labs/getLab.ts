import "server-only";
import { eq } from "drizzle-orm";
import { labs } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";

export async function getLab({ ctx }: { ctx: Ctx }) {
  const [lab] = await ctx.db.select().from(labs).where(eq(labs.id, ctx.actor.labId));
  return lab;
}
