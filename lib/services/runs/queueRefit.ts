import "server-only";
import { analysisRuns } from "@/db/schema";
import { enqueueRefitSample } from "@/lib/jobs/queue";
import type { Ctx } from "@/lib/base/context";

/** Queues a background refit of a sample from its stored picks, with a run to show its progress. */
export async function queueRefit({ ctx, input }: { ctx: Ctx; input: { sampleId: string; reason: string } }) {
  const { sampleId, reason } = input;
  const [run] = await ctx.db.insert(analysisRuns).values({ labId: ctx.actor.labId, sampleId, reason, createdBy: ctx.actor.userId }).returning();
  await enqueueRefitSample({ sampleId, labId: ctx.actor.labId, runId: run.id, reason });
  return run;
}
