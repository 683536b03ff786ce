/**
 * Listens. Used by `npm start` after set-up, and on its own for a deployment that
 * brings its own PostgreSQL (DATABASE_URL): `node --import tsx server/index.ts`.
 * The process keeps no state of its own, so several can run behind a load balancer.
 * TIDELINE_WORKER=off makes it a web-only instance (run `npm run worker` elsewhere).
 */
import type { Server } from "node:http";
import { join } from "node:path";
import { createApp } from "./app";
import { createDb, type Db } from "./db";
import { removeSpoolLeftovers } from "./export-stream";
import { workerEnabled, type Jobs } from "./jobs";
import { startJobs } from "./jobs/registry";
import { log } from "./log";
import { createMetrics, serveMetrics } from "./observability/metrics";
import { mailFromEnv } from "./mail/setup";
import { storageFromEnv } from "./photos/storage";
import { keepConnectionsAlive, shutdownHttp } from "./shutdown";
import { LocalDiskStorage } from "./photos/storage/local-disk";

export interface Running {
  server: Server;
  jobs: Jobs;
  /** Graceful: stop accepting, finish in-flight requests and running jobs within limits; the caller closes the pool. */
  stop(): Promise<void>;
}

/** Also sets up e-mail from the environment (SMTP_URL, or the local fake server) and the job queue. */
export async function serve(opts: {
  db: Db;
  port: number;
  host?: string;
  clientDir?: string;
  work?: boolean;
}): Promise<Running> {
  const mail = await mailFromEnv({ port: opts.port });
  const photoStorage = storageFromEnv();
  if (photoStorage instanceof LocalDiskStorage) {
    const removed = await photoStorage.removeLeftovers();
    if (removed.length)
      log.info({ files: removed.length }, "removed partial photo files left by an interrupted upload");
  }
  const spooled = await removeSpoolLeftovers();
  if (spooled.length) log.info({ files: spooled.length }, "removed download files left by a stopped process");
  const jobs = await startJobs(
    { db: opts.db, mailer: mail.mailer, publicUrl: mail.publicUrl, photoStorage },
    { work: opts.work ?? workerEnabled() },
  );
  const metrics = createMetrics({ db: opts.db, jobs });
  jobs.onJobEnd = metrics.jobEnded;
  const metricsServer = await startMetricsListener(metrics);
  const app = createApp({
    metrics,
    photoStorage,
    db: opts.db,
    clientDir: opts.clientDir,
    trustProxy: process.env.TRUST_PROXY === "1",
    mailer: mail.mailer,
    mailbox: mail.mailbox,
    publicUrl: mail.publicUrl,
    jobs,
  });
  const server = await new Promise<Server>((resolve, reject) => {
    const s = app.listen(opts.port, opts.host ?? process.env.HOST ?? "127.0.0.1", (err?: Error) =>
      err ? reject(err) : resolve(keepConnectionsAlive(s)),
    );
  }).catch(async (e) => {
    metricsServer?.close();
    await jobs.stop(1000);
    await mail.stop();
    throw e;
  });
  let stopping: Promise<void> | undefined;
  return {
    server,
    jobs,
    stop: () =>
      (stopping ??= (async () => {
        app.locals.draining = true; // /api/health/ready answers 503 from now on
        // Behind a load balancer: keep serving while it notices the failed readiness check.
        const delay = Number(process.env.SHUTDOWN_DRAIN_DELAY_MS ?? 0);
        if (delay > 0) await new Promise((r) => setTimeout(r, delay));
        const limit = Number(process.env.SHUTDOWN_TIMEOUT_MS ?? 25_000);
        await Promise.all([shutdownHttp(server, limit), jobs.stop(limit)]);
        metricsServer?.close();
        await mail.stop();
      })()),
  };
}

/** With METRICS_PORT: the Prometheus text on http://METRICS_HOST:METRICS_PORT/metrics, no sign-in (keep it off the public network). */
export async function startMetricsListener(metrics: ReturnType<typeof createMetrics>) {
  const port = Number(process.env.METRICS_PORT ?? 0);
  if (!port) return undefined;
  const host = process.env.METRICS_HOST ?? "127.0.0.1";
  const server = await serveMetrics(metrics, port, host);
  log.info({ port, host }, "metrics listening on their own port");
  return server;
}

/** SIGTERM / SIGINT: graceful stop, then `after` (close the pool, stop an embedded cluster), then exit. */
export function stopOnSignals(running: Running, after: () => Promise<void> | void) {
  let once = false;
  const stop = async (sig: string) => {
    if (once) return;
    once = true;
    log.info({ signal: sig }, "shutting down: no new requests; finishing in-flight requests and running jobs");
    try {
      await running.stop();
      await after();
      log.info("stopped");
      process.exit(0);
    } catch (e) {
      log.error({ err: e }, "shutdown failed");
      process.exit(1);
    }
  };
  for (const sig of ["SIGINT", "SIGTERM", "SIGHUP"] as const) process.on(sig, () => void stop(sig));
}

if (import.meta.url === `file://${process.argv[1]}`) {
  process.env.NODE_ENV ??= "production";
  if (!process.env.DATABASE_URL) {
    console.error("Set DATABASE_URL, or use `npm start` for the embedded database.");
    process.exit(1);
  }
  // DATABASE_POOL_MAX, else twice the cores for a database on this machine (2–10) or 10, with its waiting bound.
  const db = createDb(process.env.DATABASE_URL);
  const port = Number(process.env.PORT ?? 3000);
  const running = await serve({
    db,
    port,
    clientDir: process.env.CLIENT_DIR ?? join(import.meta.dirname, "..", "dist", "client"),
  });
  log.info({ port, worker: running.jobs.working }, `Tideline listening on http://127.0.0.1:${port}`);
  stopOnSignals(running, () => db.destroy());
}
