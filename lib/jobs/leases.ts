import "server-only";
import { Client } from "pg";
import type PgBoss from "pg-boss";
import { env } from "@/lib/env";

/**
 * Which worker holds which job, and which jobs lost their worker.
 *
 * pg-boss 10 (the version installed; later ones need Node 22) has no job heartbeats: a job whose
 * worker died stays active until its expiry, and a short expiry would also cut long jobs, since
 * pg-boss fails a batch whose handler runs past it. So each worker process keeps one database
 * session of its own and, while it works a job, holds a session-level advisory lock named after
 * the job. PostgreSQL releases a session's locks when the session ends: at once when the process
 * is killed (its socket closes), and within about 25 s when its machine vanishes (the keepalive
 * settings below). Every worker sweeps now and then (and once when it starts): an active job whose
 * lock nobody holds has lost its worker and is failed through pg-boss's own `fail`, which queues
 * its retry (the job handlers are idempotent: a file is stored once whatever runs it). The expiry
 * remains the last resort for a worker that is alive but stuck.
 *
 * The session must be a real one: a transaction-mode pooler (PgBouncer's `transaction` mode) drops
 * session locks, and live workers' jobs would then be retried needlessly (docker-free-dev.md).
 */

/** The advisory-lock space of job leases (an arbitrary constant, the first key of the two-key form). */
const LOCK_SPACE = 0x6a6f6273; // "jobs"
/** A job fetched this recently may not be locked yet by the worker that fetched it. */
const GRACE_SECONDS = 10;
/** After a handler ends, pg-boss completes the job: the lock is kept a little longer to cover that. */
const RELEASE_DELAY_MS = 10_000;

export function sweepSeconds(): number {
  return Number(process.env.JOB_SWEEP_SECONDS ?? 5);
}

const LOCK = `SELECT pg_try_advisory_lock($1, hashtext(id)) FROM unnest($2::text[]) AS id`;
const UNLOCK = `SELECT pg_advisory_unlock($1, hashtext(id)) FROM unnest($2::text[]) AS id`;

const log = (msg: string) => console.log(`[jobs ${process.pid}] ${msg}`);

export class JobLeases {
  private client: Client | null = null;
  private connecting: Promise<Client> | null = null;
  private readonly held = new Map<string, number>();
  private timer: NodeJS.Timeout | null = null;
  private sweeping = false;
  private stopped = false;

  constructor(
    private readonly boss: PgBoss,
    private readonly schema = "pgboss",
  ) {}

  /** Connects and sweeps once (a restarted worker takes up its predecessor's jobs), then every `sweepSeconds()`. */
  async start(): Promise<void> {
    await this.session();
    await this.sweep();
    this.timer = setInterval(() => void this.sweep(), sweepSeconds() * 1000);
    this.timer.unref();
  }

  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearInterval(this.timer);
    const c = this.client;
    this.client = null;
    await c?.end().catch(() => undefined);
  }

  /** Runs `work` holding the leases of `jobs` (a fetched batch: all are locked before any is worked). */
  async holding<T>(jobs: { id: string }[], work: () => Promise<T>): Promise<T> {
    const ids = jobs.map((j) => j.id);
    await this.lock(ids);
    try {
      return await work();
    } finally {
      setTimeout(() => void this.unlock(ids), RELEASE_DELAY_MS).unref();
    }
  }

  /**
   * Fails the active jobs whose worker is gone, so pg-boss retries them; returns how many. A lock
   * this session takes to test a job is let go at once.
   */
  async sweep(): Promise<number> {
    if (this.sweeping || this.stopped) return 0;
    this.sweeping = true;
    try {
      const c = await this.session();
      const { rows } = await c.query<{ id: string; name: string }>(
        // The candidates first (materialized), so the lock is tried on them alone.
        `WITH candidate AS MATERIALIZED (
           SELECT j.id::text AS id, j.name FROM ${this.schema}.job j
            WHERE j.state = 'active' AND j.started_on < now() - make_interval(secs => $1)
              AND NOT (j.id::text = ANY($2::text[])))
         SELECT id, name FROM candidate WHERE pg_try_advisory_lock($3, hashtext(id))`,
        [GRACE_SECONDS, [...this.held.keys()], LOCK_SPACE],
      );
      if (!rows.length) return 0;
      await c.query(UNLOCK, [LOCK_SPACE, rows.map((r) => r.id)]);
      const byQueue = new Map<string, string[]>();
      for (const r of rows) byQueue.set(r.name, [...(byQueue.get(r.name) ?? []), r.id]);
      for (const [queue, ids] of byQueue) {
        await this.boss.fail(queue, ids);
        log(`${queue}: ${ids.length} job(s) of a stopped worker queued again`);
      }
      return rows.length;
    } catch (e) {
      log(`sweep failed: ${(e as Error).message}`);
      this.drop();
      return 0;
    } finally {
      this.sweeping = false;
    }
  }

  private async lock(ids: string[]) {
    const fresh = ids.filter((id) => !this.held.has(id));
    for (const id of ids) this.held.set(id, (this.held.get(id) ?? 0) + 1);
    if (!fresh.length) return;
    try {
      const c = await this.session();
      await c.query(LOCK, [LOCK_SPACE, fresh]);
    } catch (e) {
      // Working on without the lock is safe: another worker may run the job too, and stores it once.
      log(`could not lock jobs: ${(e as Error).message}`);
      this.drop();
    }
  }

  private async unlock(ids: string[]) {
    const free: string[] = [];
    for (const id of ids) {
      const n = (this.held.get(id) ?? 1) - 1;
      if (n > 0) this.held.set(id, n);
      else {
        this.held.delete(id);
        free.push(id);
      }
    }
    if (!free.length || !this.client) return;
    await this.client.query(UNLOCK, [LOCK_SPACE, free]).catch(() => undefined);
  }

  /** The worker's own session; made again (with the locks of the jobs it holds) after it was lost. */
  private session(): Promise<Client> {
    if (this.client) return Promise.resolve(this.client);
    this.connecting ??= (async () => {
      const c = new Client({
        connectionString: env().DATABASE_URL,
        application_name: "bandcross-job-leases",
        keepAlive: true,
      });
      c.on("error", (e) => {
        log(`lease session lost: ${e.message}`);
        this.drop();
      });
      await c.connect();
      // The server ends the session (and frees its locks) ~25 s after this machine stops answering.
      await c.query("SET tcp_keepalives_idle = 10; SET tcp_keepalives_interval = 5; SET tcp_keepalives_count = 3");
      if (this.held.size) await c.query(LOCK, [LOCK_SPACE, [...this.held.keys()]]);
      this.client = c;
      return c;
    })().finally(() => (this.connecting = null));
    return this.connecting;
  }

  private drop() {
    const c = this.client;
    this.client = null;
    void c?.end().catch(() => undefined);
  }
}
