/**
 * Background jobs on pg-boss (a PostgreSQL-backed queue: jobs survive restarts, each
 * runs once across every instance, failures retry with backoff, and the rows can be
 * read in the `pgboss` schema). Tideline's own surface is this small module:
 *
 *   jobs.define(name, handler, { retryLimit, retryDelay, retryBackoff, expireInSeconds })
 *   jobs.enqueue(name, data, { trx })      // inside a Kysely transaction: commits with it
 *   jobs.schedule(name, cron, data?)       // kept in the database (pgboss.schedule)
 *
 * Every process defines every job (server/jobs/registry.ts), so a web-only instance
 * (TIDELINE_WORKER=off) creates the queues and enqueues; only processes with the
 * worker on run handlers and fire schedules.
 */
import { CompiledQuery } from "kysely";
import PgBoss from "pg-boss";
import type { Db } from "../db";
import { log as rootLog, type Logger } from "../log";

export interface JobContext {
  id: string;
  name: string;
  /** 0 on the first attempt. */
  retryCount: number;
  retryLimit: number;
  /** True when a failure now will not be retried. */
  lastAttempt: boolean;
  log: Logger;
}
export type JobHandler<T> = (data: T, ctx: JobContext) => Promise<unknown>;

export interface JobOptions {
  /** Attempts after the first (pg-boss default 2). */
  retryLimit?: number;
  /** Seconds before the first retry. */
  retryDelay?: number;
  /** Double the delay on each retry (with jitter). */
  retryBackoff?: boolean;
  /** A run longer than this is failed (and retried): the hard cap of one attempt. Default 15 minutes. */
  expireInSeconds?: number;
  /**
   * A lease for long jobs (pg-boss 10 has no heartbeat of its own): while the handler runs, this
   * process keeps its job's expiry `leaseSeconds` ahead, renewing it every third of that. A process
   * that dies (kill -9, power, OOM) stops renewing, so pg-boss's maintenance fails the job within
   * `leaseSeconds` + the maintenance interval and it is retried by another worker, instead of after
   * the whole `expireInSeconds`. `expireInSeconds` stays the cap of a live attempt.
   */
  leaseSeconds?: number;
  /** Jobs fetched at once by one worker of this process; they run one after another. */
  batchSize?: number;
}

export interface EnqueueOptions {
  /** Enqueue inside this transaction: the job exists only if the transaction commits. */
  trx?: Db;
  /** Run no earlier than this. */
  startAfter?: Date;
  /** At most one queued job per key (see pg-boss singletonKey). */
  singletonKey?: string;
}

export interface JobsConfig {
  /** The queue's own connections (pg-boss's polling and bookkeeping); see queueDbFor in server/db.ts. */
  db: Db;
  /** Close `db` on stop (it is the queue's own pool, not the app's). */
  ownsDb?: boolean;
  /** Run handlers and schedules in this process (false in a web-only instance). */
  work: boolean;
  /** How often each queue is polled when idle; default TIDELINE_JOB_POLL_SECONDS or 2. */
  pollingIntervalSeconds?: number;
  /** Seconds between schedule checks (pg-boss default 30; tests use less). */
  cronMonitorIntervalSeconds?: number;
  /**
   * Seconds between pg-boss's maintenance runs, fleet-wide (it fails expired jobs, so it bounds how
   * soon a dead worker's job is retried); default TIDELINE_JOB_MAINTENANCE_SECONDS or 30
   * (pg-boss's own default is 120).
   */
  maintenanceIntervalSeconds?: number;
  log?: Logger;
}

interface Definition {
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- one map holds handlers of every payload type
  handler: JobHandler<any>;
  options: JobOptions;
}

/** pg-boss talks to PostgreSQL through Kysely's pool (one pool per process), or a transaction. */
const executor = (db: Db): PgBoss.Db => ({
  async executeSql(text, values) {
    const r = await db.withoutPlugins().executeQuery(CompiledQuery.raw(text, values ?? []));
    // eslint-disable-next-line @typescript-eslint/no-explicit-any -- pg-boss's Db interface types rows as any[]
    return { rows: r.rows as any[] };
  },
});

export class Jobs {
  private boss: PgBoss;
  private defs = new Map<string, Definition>();
  private schedules = new Map<string, { cron: string; data: object; tz: string } | null>();
  private started = false;
  private stopping = false;
  private failures = 0;
  /** pg-boss worker ids of this process, per queue (for `wake`). */
  private workerIds = new Map<string, string>();
  readonly log: Logger;
  /** Hooks for metrics: called after each job with its outcome and duration. */
  onJobEnd?: (name: string, ok: boolean, seconds: number) => void;

  constructor(private config: JobsConfig) {
    this.log = (config.log ?? rootLog).child({ component: "jobs" });
    const poll = config.pollingIntervalSeconds ?? Number(process.env.TIDELINE_JOB_POLL_SECONDS ?? 2);
    const maintenance = config.maintenanceIntervalSeconds ?? Number(process.env.TIDELINE_JOB_MAINTENANCE_SECONDS ?? 30);
    this.boss = new PgBoss({
      db: executor(config.db),
      schema: "pgboss",
      supervise: config.work,
      schedule: config.work,
      migrate: true,
      pollingIntervalSeconds: poll,
      maintenanceIntervalSeconds: Math.max(1, Math.round(maintenance)),
      ...(config.cronMonitorIntervalSeconds ? { cronMonitorIntervalSeconds: config.cronMonitorIntervalSeconds } : {}),
    });
    // Unheard 'error' events would end the process; a lost connection is logged and polling goes on.
    this.boss.on("error", (e) => this.log.error({ err: e }, "job queue error"));
  }

  get working() {
    return this.config.work;
  }

  /** Declare a job and its handler; call before start(). */
  define<T>(name: string, handler: JobHandler<T>, options: JobOptions = {}) {
    if (this.started) throw new Error(`define("${name}") after start()`);
    this.defs.set(name, { handler, options });
  }

  /** A schedule kept in the database; set again on every start by the processes that work. */
  every(name: string, cron: string, data: object = {}, tz = "UTC") {
    this.schedules.set(name, { cron, data, tz });
  }

  /** Removes a schedule kept in the database (e.g. switched off by configuration). */
  never(name: string) {
    this.schedules.set(name, null);
  }

  async start() {
    if (this.started) return;
    await this.boss.start();
    for (const [name, { options }] of this.defs) {
      const { batchSize: _b, ...queueOpts } = options;
      const q = Object.fromEntries(Object.entries(queueOpts).filter(([, v]) => v !== undefined));
      const { leaseSeconds: _l, ...policy } = q;
      await this.boss.createQueue(name, { name, ...policy });
      await this.boss.updateQueue(name, { name, ...policy });
    }
    if (this.config.work) {
      for (const [name, def] of this.defs) {
        const id = await this.boss.work(
          name,
          { includeMetadata: true, batchSize: def.options.batchSize ?? 1 },
          async (jobs) => {
            try {
              await this.run(name, def, jobs);
            } finally {
              // A worker that found work asks again at once instead of sleeping out its polling
              // interval: a queue of twenty photos drains back to back, not one per poll.
              this.wake(name);
            }
          },
        );
        this.workerIds.set(name, id);
      }
      for (const [name, s] of this.schedules) {
        if (s) await this.boss.schedule(name, s.cron, s.data, { tz: s.tz });
        else await this.boss.unschedule(name);
      }
    }
    this.started = true;
    this.log.info({ queues: [...this.defs.keys()], worker: this.config.work }, "job queue started");
  }

  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- the payload type is the handler's (Definition)
  private async run(name: string, def: Definition, batch: PgBoss.JobWithMetadata<any>[]) {
    // pg-boss completes or fails the whole batch; batches are 1 unless a job asks for more.
    for (const job of batch) {
      const ctx: JobContext = {
        id: job.id,
        name,
        retryCount: job.retryCount,
        retryLimit: job.retryLimit,
        lastAttempt: job.retryCount >= job.retryLimit,
        log: this.log.child({ job: name, jobId: job.id, attempt: job.retryCount + 1 }),
      };
      const t0 = performance.now();
      const lease = def.options.leaseSeconds ? await this.holdLease(job, def.options.leaseSeconds, ctx.log) : null;
      try {
        await def.handler(job.data, ctx);
        this.onJobEnd?.(name, true, (performance.now() - t0) / 1000);
      } catch (e) {
        this.failures++;
        this.onJobEnd?.(name, false, (performance.now() - t0) / 1000);
        ctx.log.warn({ err: e, willRetry: !ctx.lastAttempt }, "job failed");
        throw e;
      } finally {
        lease?.release();
      }
    }
  }

  /**
   * Keeps one running job's expiry `seconds` ahead until released. pg-boss 10 fails an active job
   * when `started_on + expire_in < now()`; the lease moves `started_on` (never `expire_in`, which a
   * retried job keeps and which bounds its next attempt in the worker). The update matches this
   * attempt only (`retry_count`, state active): once the job has been failed and fetched again
   * elsewhere, a late renewal from here changes nothing.
   */
  private async holdLease(job: PgBoss.JobWithMetadata<unknown>, seconds: number, log: Logger) {
    const db = executor(this.config.db);
    const renew = () =>
      db.executeSql(
        `update pgboss.job set started_on = now() + make_interval(secs => $3) - expire_in
         where name = $1 and id = $2 and state = 'active' and retry_count = $4`,
        [job.name, job.id, seconds, job.retryCount],
      );
    await renew().catch((e) => log.warn({ err: e }, "job lease not renewed"));
    const timer = setInterval(
      () => void renew().catch((e) => log.warn({ err: e }, "job lease not renewed")),
      Math.max(250, (seconds * 1000) / 3),
    );
    timer.unref();
    return { release: () => clearInterval(timer) };
  }

  /** Queue a job; with `trx` it is part of that transaction. Throws for an undefined job. */
  async enqueue<T extends object>(name: string, data: T, opts: EnqueueOptions = {}): Promise<string | null> {
    if (!this.defs.has(name)) throw new Error(`No job named "${name}" is defined (server/jobs/registry.ts)`);
    const options: PgBoss.SendOptions = {};
    if (opts.trx) options.db = executor(opts.trx);
    if (opts.startAfter) options.startAfter = opts.startAfter;
    if (opts.singletonKey) options.singletonKey = opts.singletonKey;
    const id = await this.boss.send(name, data, options);
    if (!id && !opts.singletonKey)
      throw new Error(`The job queue refused "${name}" (is its queue created? call jobs.start() first)`);
    return id;
  }

  /**
   * Ask this process's worker for `name` to look for work now rather than at its next poll
   * (pg-boss's notifyWorker). Call it after the transaction that queued a job has committed;
   * a web-only process has no worker and nothing happens. Other instances' workers still find
   * the job at their next poll.
   */
  wake(name: string) {
    const id = this.workerIds.get(name);
    if (id && !this.stopping) this.boss.notifyWorker(id);
  }

  async schedule(name: string, cron: string, data: object = {}, tz = "UTC") {
    await this.boss.schedule(name, cron, data, { tz });
  }

  async unschedule(name: string) {
    await this.boss.unschedule(name);
  }

  /**
   * Which of `values` still have a job of `name` waiting or running whose payload's `key` holds it:
   * a record whose job is gone (its last attempt failed by expiry after a crash) is not among them.
   */
  async liveFor(name: string, key: string, values: string[]): Promise<Set<string>> {
    if (!values.length) return new Set();
    const { rows } = await executor(this.config.db).executeSql(
      `select distinct data->>$2 as v from pgboss.job
        where name = $1 and state in ('created', 'retry', 'active') and data->>$2 = any($3)`,
      [name, key, values],
    );
    return new Set(rows.map((r) => r.v as string));
  }

  /** Jobs waiting or running, per queue, and the failures seen by this process. */
  async stats() {
    const queues: Record<string, { waiting: number; active: number; failed: number }> = {};
    const { rows } = await executor(this.config.db).executeSql(
      `select name, state, count(*)::int as n from pgboss.job where name = any($1) group by name, state`,
      [[...this.defs.keys()]],
    );
    for (const name of this.defs.keys()) queues[name] = { waiting: 0, active: 0, failed: 0 };
    for (const r of rows) {
      const q = queues[r.name];
      if (r.state === "created" || r.state === "retry") q.waiting += r.n;
      else if (r.state === "active") q.active += r.n;
      else if (r.state === "failed") q.failed += r.n;
    }
    return { queues, failuresHere: this.failures };
  }

  /** Running: started and not stopping (the readiness check). */
  get running() {
    return this.started && !this.stopping;
  }

  /**
   * Stop taking jobs; wait up to `timeoutMs` for running ones to finish, then hand the
   * rest back to the queue (failed with a retry left, so another worker picks them up).
   */
  async stop(timeoutMs = 20_000) {
    if (!this.started || this.stopping) return;
    this.stopping = true;
    await this.boss.stop({ graceful: true, timeout: timeoutMs, close: false, wait: true });
    if (this.config.ownsDb) await this.config.db.destroy().catch(() => {});
    this.log.info("job queue stopped");
  }
}

export const createJobs = (config: JobsConfig) => new Jobs(config);

/** The worker switch: TIDELINE_WORKER=off (or 0/false) makes a web-only instance. */
export const workerEnabled = (env = process.env) =>
  !["off", "0", "false", "no"].includes((env.TIDELINE_WORKER ?? "on").toLowerCase());
