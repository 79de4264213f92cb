import "server-only";
import { desc, eq } from "drizzle-orm";
import type { DbCtx } from "@/lib/base/context";
import { crossingEvents, type CrossingEvent } from "@/db/schema";

/** The sample's latest event of any kind, or null. */
export async function latestEvent({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<CrossingEvent | null> {
  const [e] = await ctx.db.select().from(crossingEvents).where(eq(crossingEvents.sampleId, input.sampleId)).orderBy(desc(crossingEvents.createdAt)).limit(1);
  return e ?? null;
}
