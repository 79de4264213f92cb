import "server-only";
import { and, desc, eq, isNull } from "drizzle-orm";
import type { DbCtx } from "@/lib/base/context";
import { crossings, type Crossing } from "@/db/schema";

/** The sample's newest crossing of all regions together: the current fit. */
export async function currentCrossing({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<Crossing | null> {
  const [c] = await ctx.db
    .select()
    .from(crossings)
    .where(and(eq(crossings.sampleId, input.sampleId), isNull(crossings.region)))
    .orderBy(desc(crossings.createdAt))
    .limit(1);
  return c ?? null;
}
