import "server-only";
import { sql } from "drizzle-orm";
import type { DbCtx } from "@/lib/base/context";
import { samples } from "@/db/schema";

/**
 * Serialises every "is this a new event?" decision about one sample: a row lock on the sample,
 * held until the caller's transaction ends. Two workers refitting the same sample at once (or a
 * refit racing a confirmation) take turns here, and the second one sees the event the first one
 * stored. The unique index on (crossing_id, kind) backs this up for the same crossing row.
 */
export async function lockSample({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<void> {
  await ctx.db.execute(sql`select id from ${samples} where ${samples.id} = ${input.sampleId} for update`);
}
