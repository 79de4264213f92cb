import "server-only";
import { analysisRuns } from "@/db/schema";
import { enqueueReanalyzeSample } from "@/lib/jobs/queue";
import type { Ctx } from "@/lib/base/context";

/** Queues a background re-analysis of a sample (fields and automatic picks), with a run to show its progress. */
export async function queueReanalysis({ ctx, input }: { ctx: Ctx; input: { sampleId: string; reason: string } }) {
  const { sampleId, reason } = input;
  const [run] = await ctx.db.insert(analysisRuns).values({ labId: ctx.actor.labId, sampleId, reason, createdBy: ctx.actor.userId }).returning();
  await enqueueReanalyzeSample({ sampleId, labId: ctx.actor.labId, reason });
  return run;
}
