import "server-only";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { SystemCtx } from "@/lib/base/context";
import { analysisRuns, spectra } from "@/db/schema";
import { refitSample } from "./refitSample";
import { RefitResult } from "./shared";

/**
 * A queued refit (refit-sample job) with its progress run: running, then done with the sample's
 * spectrum count. A re-analysis that took the run over meanwhile (it covers every open run of
 * the sample, and ends in a refit itself) has marked it done already; that is left as it is.
 */
export async function runRefit({ ctx, input: job }: { ctx: SystemCtx; input: { sampleId: string; runId: string } }): Promise<RefitResult> {
  const { db } = ctx;
  const open = and(eq(analysisRuns.id, job.runId), inArray(analysisRuns.status, ["queued", "running"]));
  const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(spectra).where(eq(spectra.sampleId, job.sampleId));
  await db.update(analysisRuns).set({ status: "running", total: n, done: 0, updatedAt: new Date() }).where(open);
  const result = await refitSample({ ctx, input: { sampleId: job.sampleId } });
  await db.update(analysisRuns).set({ status: "done", done: n, updatedAt: new Date() }).where(open);
  return result;
}
