/**
 * Prometheus metrics (prom-client, text format 0.0.4): request counts and latency by route
 * template, the database pool, the job queue (depth, runs, failures, durations), photo
 * processing time, and Node's own process metrics. One registry per process (or per app in
 * tests); read by `GET /api/metrics` (an admin, or the bearer METRICS_TOKEN) and, with
 * METRICS_PORT, by a listener of its own on METRICS_HOST (127.0.0.1 unless told).
 */
import { timingSafeEqual, createHash } from "node:crypto";
import { createServer, type Server } from "node:http";
import type { Request, RequestHandler } from "express";
import { Counter, Gauge, Histogram, Registry, collectDefaultMetrics } from "prom-client";
import { poolOf, type Db } from "../db";
import type { Jobs } from "../jobs";
import { log } from "../log";
import { RENDITION_JOB } from "../photos/service";

export interface Metrics {
  registry: Registry;
  /** Times every request; labels it with the route template Express matched. */
  http: RequestHandler;
  /** Called by the job queue after each job (Jobs.onJobEnd). */
  jobEnded(name: string, ok: boolean, seconds: number): void;
  text(): Promise<string>;
  contentType: string;
}

/** The route as declared (`/api/sites/:siteId/defects`), never the concrete URL: ids would explode the label set. */
export function routeTemplate(req: Request): string {
  const route = (req as Request & { route?: { path?: unknown } }).route;
  if (route && typeof route.path === "string") return `${req.baseUrl}${route.path}`;
  if (req.originalUrl.startsWith("/api/")) return "/api (no route)";
  return "(page or asset)";
}

/**
 * The event-loop delay histogram's sampling interval (prom-client's `eventLoopMonitoringPrecision`, its
 * default, set here by name): Node's monitorEventLoopDelay records the whole time between two of its timer
 * ticks, this interval included, so an idle process reads about this much as its minimum. The bench
 * subtracts it to report the delay beyond the interval (server/bench/load.ts).
 */
export const EVENT_LOOP_RESOLUTION_MS = 10;

export function createMetrics(opts: { db: Db; jobs?: Jobs; defaultMetrics?: boolean }): Metrics {
  const registry = new Registry();
  if (opts.defaultMetrics !== false)
    collectDefaultMetrics({
      register: registry,
      prefix: "tideline_",
      eventLoopMonitoringPrecision: EVENT_LOOP_RESOLUTION_MS,
    });

  const requests = new Counter({
    name: "tideline_http_requests_total",
    help: "HTTP requests answered, by method, route template and status code.",
    labelNames: ["method", "route", "status"] as const,
    registers: [registry],
  });
  const duration = new Histogram({
    name: "tideline_http_request_duration_seconds",
    help: "Time from receiving a request to the end of its response, by method and route template.",
    labelNames: ["method", "route"] as const,
    buckets: [0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10, 30],
    registers: [registry],
  });
  const inFlight = new Gauge({
    name: "tideline_http_requests_in_flight",
    help: "Requests being answered now.",
    registers: [registry],
  });

  const pool = poolOf(opts.db);
  new Gauge({
    name: "tideline_db_pool_connections",
    help: "Connections of this process's PostgreSQL pool: open in all, idle, and requests waiting for one.",
    labelNames: ["state"] as const,
    registers: [registry],
    collect() {
      if (!pool) return;
      this.set({ state: "total" }, pool.totalCount);
      this.set({ state: "idle" }, pool.idleCount);
      this.set({ state: "waiting" }, pool.waitingCount);
    },
  });
  new Gauge({
    name: "tideline_db_pool_max",
    help: "Most connections this process's pool opens (DATABASE_POOL_MAX, else its default: see server/db.ts defaultPoolMax).",
    registers: [registry],
    collect() {
      if (pool) this.set(pool.options.max ?? 10);
    },
  });

  const jobRuns = new Counter({
    name: "tideline_jobs_finished_total",
    help: "Background job runs finished by this process, by queue and outcome (a failed run may be retried).",
    labelNames: ["queue", "outcome"] as const,
    registers: [registry],
  });
  const jobSeconds = new Histogram({
    name: "tideline_job_duration_seconds",
    help: "Run time of background jobs in this process, by queue.",
    labelNames: ["queue"] as const,
    buckets: [0.01, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10, 30, 60, 300],
    registers: [registry],
  });
  const photoSeconds = new Histogram({
    name: "tideline_photo_processing_seconds",
    help: "Time to make a photo's display copy and thumbnail (read the original, decode, write both).",
    buckets: [0.1, 0.25, 0.5, 1, 2, 4, 8, 16, 32],
    registers: [registry],
  });
  const jobs = opts.jobs;
  if (jobs) {
    new Gauge({
      name: "tideline_jobs",
      help: "Jobs in the queue (shared by every instance), by queue and state: waiting, active, failed.",
      labelNames: ["queue", "state"] as const,
      registers: [registry],
      async collect() {
        const s = await jobs.stats().catch((e) => {
          log.warn({ err: e }, "queue depth could not be read for metrics");
          return null;
        });
        if (!s) return;
        for (const [queue, n] of Object.entries(s.queues))
          for (const state of ["waiting", "active", "failed"] as const) this.set({ queue, state }, n[state]);
      },
    });
    new Gauge({
      name: "tideline_job_worker_running",
      help: "1 when this process runs job handlers (TIDELINE_WORKER is not off) and its queue is running.",
      registers: [registry],
      collect() {
        this.set(jobs.working && jobs.running ? 1 : 0);
      },
    });
  }

  return {
    registry,
    contentType: registry.contentType,
    text: () => registry.metrics(),
    http(req, res, next) {
      const end = duration.startTimer();
      inFlight.inc();
      let done = false;
      const finish = () => {
        if (done) return;
        done = true;
        inFlight.dec();
        const route = routeTemplate(req);
        end({ method: req.method, route });
        requests.inc({ method: req.method, route, status: String(res.statusCode) });
      };
      res.once("finish", finish);
      res.once("close", finish);
      next();
    },
    jobEnded(name, ok, seconds) {
      jobRuns.inc({ queue: name, outcome: ok ? "ok" : "failed" });
      jobSeconds.observe({ queue: name }, seconds);
      if (ok && name === RENDITION_JOB) photoSeconds.observe(seconds);
    },
  };
}

/** Bearer METRICS_TOKEN, compared in constant time (hashes of equal length). */
export function hasMetricsToken(header: string | undefined, token: string | undefined): boolean {
  if (!token || !header?.startsWith("Bearer ")) return false;
  const a = createHash("sha256").update(header.slice(7)).digest();
  const b = createHash("sha256").update(token).digest();
  return timingSafeEqual(a, b);
}

/** A listener of its own for the scraper (METRICS_PORT), so the metrics never share the public port. */
export function serveMetrics(metrics: Metrics, port: number, host = "127.0.0.1"): Promise<Server> {
  const server = createServer((req, res) => {
    if (req.method !== "GET" || (req.url ?? "").split("?")[0] !== "/metrics") {
      res.writeHead(404, { "Content-Type": "text/plain" }).end("Only GET /metrics here.\n");
      return;
    }
    metrics.text().then(
      (body) => res.writeHead(200, { "Content-Type": metrics.contentType }).end(body),
      (e) => {
        log.error({ err: e }, "metrics could not be collected");
        res.writeHead(500, { "Content-Type": "text/plain" }).end("Metrics could not be collected.\n");
      },
    );
  });
  return new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, host, () => resolve(server));
  });
}
