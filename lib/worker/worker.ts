/**
 * The background worker, an entry point above the services: it takes jobs from the queue
 * (lib/jobs/queue.ts) and runs each as one service verb in a system context. `npm start` runs one;
 * run more on any machine with the same environment (`node --import tsx lib/worker/worker.ts`) and
 * they share the queue. SIGINT/SIGTERM finish the current jobs and stop.
 */
import pLimit from "p-limit";
import type PgBoss from "pg-boss";
import type { Faults } from "@/lib/base/context";
import { JobLeases } from "@/lib/jobs/leases";
import { boss, QUEUES, stopBoss, type NotifyEventJob, type ProcessUploadJob, type ReanalyzeSampleJob, type RefitSampleJob } from "@/lib/jobs/queue";
import { deliverEvent } from "@/lib/services/alerts/deliverEvent";
import { runRefit } from "@/lib/services/analysis/runRefit";
import { runReanalysis } from "@/lib/services/analysis/runReanalysis";
import { closeSystemContext, systemContext } from "@/lib/services/system";
import { markUploadFailed } from "@/lib/services/uploads/markUploadFailed";
import { processUpload } from "@/lib/services/uploads/processUpload";

const log = (msg: string) => console.log(`[worker ${process.pid}] ${msg}`);

const lastTry = (job: PgBoss.JobWithMetadata<unknown>) => job.retryCount >= job.retryLimit;

/**
 * Fault injection for the crash-recovery test only (NODE_ENV=test): WORKER_FAULT=hang-after-parse
 * makes this worker stop forever mid-job, as a killed process would, so the test can kill it.
 */
function testFaults(): Faults | undefined {
  if (process.env.NODE_ENV !== "test" || process.env.WORKER_FAULT !== "hang-after-parse") return undefined;
  return { afterParse: () => new Promise<void>(() => log("fault injection: hanging mid-job")) };
}

export async function startWorker(): Promise<() => Promise<void>> {
  const b = await boss("worker");
  // Jobs of a worker that stopped are taken up by the others (and by this one when it restarts).
  const leases = new JobLeases(b);
  await leases.start();
  const ctx = systemContext("worker", testFaults());
  const concurrency = Number(process.env.WORKER_CONCURRENCY ?? 2);
  const handleUpload = async (job: PgBoss.JobWithMetadata<ProcessUploadJob>) => {
    const started = Date.now();
    try {
      const out = await processUpload({ ctx, input: { uploadId: job.data.uploadId } });
      log(`${QUEUES.processUpload} ${job.data.uploadId}: ${out.status}${out.status === "done" ? ` (${out.spectra} spectra, ${out.curves} I(z) curves, ${Date.now() - started} ms)` : ""}`);
    } catch (e) {
      log(`${QUEUES.processUpload} ${job.data.uploadId}: attempt ${job.retryCount + 1} failed: ${(e as Error).message}`);
      if (lastTry(job)) return markUploadFailed({ ctx, input: { uploadId: job.data.uploadId, error: e } });
      // Only this job is retried (with backoff); pg-boss completes the rest of the batch, and a
      // failed job is no longer active, so that completion leaves it alone.
      await b.fail(QUEUES.processUpload, job.id, { message: (e as Error).message });
    }
  };
  // pg-boss waits a polling interval (at least 0.5 s) between fetches of a poller, so one job per
  // fetch capped the worker at two files a second per poller. One poller takes a batch per fetch
  // and works it `concurrency` files at a time.
  const batchSize = Math.max(concurrency, Number(process.env.WORKER_BATCH ?? 4 * concurrency));
  await b.work<ProcessUploadJob>(QUEUES.processUpload, { includeMetadata: true, batchSize, pollingIntervalSeconds: 0.5 }, async (jobs) => {
    const limit = pLimit(concurrency);
    await leases.holding(jobs, () => Promise.all(jobs.map((job) => limit(() => handleUpload(job)))));
  });
  await b.work<ReanalyzeSampleJob>(QUEUES.reanalyzeSample, { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 1 }, async (jobs) => leases.holding(jobs, async () => {
    const [job] = jobs;
    const started = Date.now();
    let out;
    try {
      out = await runReanalysis({ ctx, input: { sampleId: job.data.sampleId, lastAttempt: lastTry(job) } });
    } catch (e) {
      log(`${QUEUES.reanalyzeSample} ${job.data.sampleId}: attempt ${job.retryCount + 1} failed: ${(e as Error).message}`);
      throw e;
    }
    log(`${QUEUES.reanalyzeSample} ${job.data.sampleId}: ${out === "superseded" ? "superseded by a newer version" : "done"} in ${Date.now() - started} ms (${job.data.reason})`);
  }));
  await b.work<RefitSampleJob>(QUEUES.refitSample, { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 1 }, async (jobs) => leases.holding(jobs, async () => {
    const [job] = jobs;
    const started = Date.now();
    await runRefit({ ctx, input: job.data });
    log(`${QUEUES.refitSample} ${job.data.sampleId}: done in ${Date.now() - started} ms (${job.data.reason})`);
  }));
  // Crossing alerts are decided inside every refit (refitSample → afterRefit); this queue only
  // e-mails them, so a mail-service outage is retried here without redoing any fit.
  await b.work<NotifyEventJob>(QUEUES.notifyEvent, { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 1 }, async (jobs) => leases.holding(jobs, async () => {
    const [job] = jobs;
    try {
      const out = await deliverEvent({ ctx, input: { eventId: job.data.eventId } });
      log(`${QUEUES.notifyEvent} ${job.data.eventId}: ${out.sent} sent, ${out.skipped} already sent or no longer watching`);
    } catch (e) {
      log(`${QUEUES.notifyEvent} ${job.data.eventId}: attempt ${job.retryCount + 1} failed: ${(e as Error).message}`);
      throw e;
    }
  }));
  log(`listening on ${Object.values(QUEUES).join(", ")} (concurrency ${concurrency})`);
  return async () => {
    await stopBoss();
    await leases.stop();
    await closeSystemContext();
  };
}

const isMain = process.argv[1] && /lib\/worker\/worker\.ts$/.test(process.argv[1]);
if (isMain) {
  startWorker()
    .then((stop) => {
      let stopping = false;
      const shutdown = (sig: string) => {
        if (stopping) return;
        stopping = true;
        log(`${sig}: finishing current jobs`);
        stop().then(
          () => process.exit(0),
          () => process.exit(1),
        );
      };
      process.on("SIGINT", () => shutdown("SIGINT"));
      process.on("SIGTERM", () => shutdown("SIGTERM"));
    })
    .catch((e) => {
      console.error(`worker: ${e instanceof Error ? e.message : String(e)}`);
      process.exit(1);
    });
}
