import "server-only";
import { and, eq, inArray } from "drizzle-orm";
import { analysisRuns } from "@/db/schema";
import type { SystemCtx } from "@/lib/base/context";
import { reanalyzeSample } from "./reanalyzeSample";
import type { RefitResult } from "./shared";

/**
 * The reanalyze-sample job: one re-analysis covers every run of the sample still queued or running
 * (it reads the newest versions). When the job's last attempt fails, those runs end as failed, so no
 * progress bar waits for work that stopped; the error is thrown on for the queue either way.
 */
export async function runReanalysis({ ctx, input }: { ctx: SystemCtx; input: { sampleId: string; lastAttempt: boolean } }): Promise<RefitResult | "superseded"> {
  const runs = await ctx.db
    .select({ id: analysisRuns.id })
    .from(analysisRuns)
    .where(and(eq(analysisRuns.sampleId, input.sampleId), inArray(analysisRuns.status, ["queued", "running", "fitting"])));
  const runIds = runs.map((r) => r.id);
  try {
    return await reanalyzeSample({ ctx, input: { sampleId: input.sampleId, runIds } });
  } catch (e) {
    if (input.lastAttempt && runIds.length) {
      await ctx.db
        .update(analysisRuns)
        .set({ status: "failed", message: `The re-analysis stopped: ${(e as Error).message}. Save the settings again to retry.`, updatedAt: new Date() })
        .where(inArray(analysisRuns.id, runIds));
    }
    throw e;
  }
}
