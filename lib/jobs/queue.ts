import "server-only";
import PgBoss from "pg-boss";
import type { DbOrTx } from "@/db/client";
import { env } from "@/lib/env";

/**
 * The background queue: pg-boss on the product's own PostgreSQL (schema `pgboss`), so a queued
 * upload survives a restart and any number of worker processes on any number of machines share
 * the work. Job kinds and their options live here and nowhere else.
 */
export const QUEUES = {
  /** Parse a raw file, store its spectra, pick gaps, estimate fields, refit the sample. */
  processUpload: "process-upload",
  /** Re-run the automatic picks and fields of a sample after its settings or field model changed. */
  reanalyzeSample: "reanalyze-sample",
  /** Refit a sample's crossing from its stored picks (a lab setting changed which picks enter the fit). */
  refitSample: "refit-sample",
  /** E-mail one crossing event to its recipients (the in-app notifications exist already). */
  notifyEvent: "notify-event",
} as const;

export type ProcessUploadJob = { uploadId: string };
export type ReanalyzeSampleJob = { sampleId: string; labId: string; reason: string };
export type NotifyEventJob = { eventId: string };
export type RefitSampleJob = { sampleId: string; labId: string; runId: string; reason: string };

/** Seconds a job may stay active before it is presumed dead (worker killed) and retried. */
export function jobExpireSeconds(): number {
  return Number(process.env.JOB_EXPIRE_SECONDS ?? 600);
}

const globalForBoss = globalThis as unknown as { bandcrossBoss?: Promise<PgBoss>; bandcrossBossRole?: "worker" | "sender" };

/**
 * The queue client of this process. Web processes only send jobs; worker processes also run the
 * queue's upkeep (expiring jobs of dead workers so they are retried, archiving old ones).
 */
export function boss(role: "worker" | "sender" = "sender"): Promise<PgBoss> {
  if (globalForBoss.bandcrossBoss && role === "worker" && globalForBoss.bandcrossBossRole !== "worker") {
    throw new Error("the queue client was started as a sender; start the worker before sending");
  }
  globalForBoss.bandcrossBossRole ??= role;
  globalForBoss.bandcrossBoss ??= (async () => {
    const b = new PgBoss({
      supervise: role === "worker",
      schedule: false,
      connectionString: env().DATABASE_URL,
      max: Number(process.env.JOB_POOL_MAX ?? 4),
      application_name: "bandcross-jobs",
      maintenanceIntervalSeconds: Number(process.env.JOB_MAINTENANCE_SECONDS ?? 60),
    });
    b.on("error", (e) => console.error("[jobs]", e instanceof Error ? e.message : e));
    await b.start();
    const common = { retryLimit: 4, retryDelay: 2, retryBackoff: true, expireInSeconds: jobExpireSeconds() };
    await b.createQueue(QUEUES.processUpload, { name: QUEUES.processUpload, ...common });
    await b.createQueue(QUEUES.reanalyzeSample, { name: QUEUES.reanalyzeSample, ...common });
    await b.createQueue(QUEUES.refitSample, { name: QUEUES.refitSample, ...common });
    // A mail-service outage is retried for about half an hour (5 s doubling, 8 tries) without redoing any fit.
    await b.createQueue(QUEUES.notifyEvent, { name: QUEUES.notifyEvent, ...common, retryLimit: 8, retryDelay: 5 });
    return b;
  })();
  return globalForBoss.bandcrossBoss;
}

/**
 * Queues processing of an upload. The job id is the upload id for the first run, so a repeated
 * "complete" call never queues the same file twice; a retry asked for by a person gets a fresh id.
 */
export async function enqueueProcessUpload(uploadId: string, opts: { retry?: boolean } = {}): Promise<void> {
  const b = await boss();
  const options = { expireInSeconds: jobExpireSeconds(), ...(opts.retry ? {} : { id: uploadId }) };
  await b.send(QUEUES.processUpload, { uploadId } satisfies ProcessUploadJob, options);
}

export async function enqueueReanalyzeSample(job: ReanalyzeSampleJob): Promise<void> {
  const b = await boss();
  // Every save queues its own run: a job already running has read the older version, so a
  // newer one must run after it (refits are serialised per sample, so runs never interleave badly).
  await b.send(QUEUES.reanalyzeSample, job);
}

export async function enqueueRefitSample(job: RefitSampleJob): Promise<void> {
  const b = await boss();
  await b.send(QUEUES.refitSample, job);
}

/**
 * Queues the e-mail of a crossing event inside the caller's transaction (pg-boss writes its job
 * row through the same connection), so an event is never stored without its delivery job nor the
 * job queued for an event that was rolled back. The job id is the event id: queued once.
 */
export async function enqueueNotifyEvent(tx: DbOrTx, job: NotifyEventJob): Promise<void> {
  const b = await boss();
  await b.send(QUEUES.notifyEvent, job satisfies NotifyEventJob, { id: job.eventId, db: jobDbOf(tx) });
}

/**
 * pg-boss's `db` option for a drizzle handle: drizzle's node-postgres session keeps the pg client
 * (the pooled connection of a transaction, or the pool itself) as `session.client`.
 */
function jobDbOf(tx: DbOrTx): PgBoss.Db {
  const client = (tx as unknown as { session?: { client?: { query: (text: string, values: unknown[]) => Promise<{ rows: unknown[] }> } } }).session?.client;
  if (!client || typeof client.query !== "function") throw new Error("enqueueNotifyEvent: the database handle exposes no pg client");
  return { executeSql: (text, values) => client.query(text, values) as Promise<{ rows: any[] }> }; // eslint-disable-line @typescript-eslint/no-explicit-any
}

export async function stopBoss(): Promise<void> {
  const b = await globalForBoss.bandcrossBoss;
  globalForBoss.bandcrossBoss = undefined;
  globalForBoss.bandcrossBossRole = undefined;
  await b?.stop({ graceful: true, wait: true, timeout: 10_000 });
}
