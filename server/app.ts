import "./types";
import { existsSync } from "node:fs";
import { join } from "node:path";
import compression from "compression";
import express, { Router } from "express";
import expressStaticGzip from "express-static-gzip";
import { createLucia } from "./auth/lucia";
import { authRoutes } from "./auth/routes";
import { createLimiters } from "./auth/throttle";
import { poolState, probeDbFor, type Db } from "./db";
import { AppError } from "./errors";
import { databaseState, readinessCheck } from "./health";
import { log as rootLog, type Logger } from "./log";
import { requestLogging } from "./observability/http";
import { createMetrics, hasMetricsToken, type Metrics } from "./observability/metrics";
import { errorHandler } from "./middleware/error-handler";
import {
  allowedHostsFrom,
  hostAllowlist,
  parseHostList,
  plainErrorPage,
  securityHeaders,
} from "./middleware/hardening";
import { answerCompression } from "./middleware/compress";
import { originCheck } from "./middleware/origin";
import { pathGate } from "./middleware/path-gate";
import { requireAdmin } from "./middleware/roles";
import { sessionMiddleware } from "./middleware/session";
import { readingRoutes } from "./readings/routes";
import { siteRoutes } from "./sites/routes";
import { photoRoutes } from "./photos/routes";
import { storageFromEnv, type PhotoStorage } from "./photos/storage";
import { inventoryRoutes } from "./inventory/routes";
import { invitationRoutes } from "./invitations/routes";
import type { FakeMailbox } from "./mail/fake-smtp";
import { unconfiguredMailer, type Mailer } from "./mail/mailer";
import { mailboxRoutes } from "./mail/routes";
import { notificationRoutes } from "./notifications/routes";
import { passwordResetRoutes } from "./password-reset/routes";
import { defectRoutes } from "./defects/routes";
import { partsRoutes } from "./parts/routes";
import type { Jobs } from "./jobs";
import { reportRoutes } from "./reports/routes";
import { preparedFileRoutes } from "./prepared-files/routes";
import { rtsRoutes } from "./return-to-service/routes";

export interface AppDeps {
  db: Db;
  /** Built client to serve (dist/client); omitted in tests and in dev (Vite serves it). */
  clientDir?: string;
  /** Behind a TLS-terminating proxy: trust X-Forwarded-* so cookies get Secure. */
  trustProxy?: boolean;
  /** Sends e-mail (server/mail/setup.ts builds it from the environment); without one, every send fails and is logged. */
  mailer?: Mailer;
  /** The local fake mail server's messages, present only when it runs (SMTP_URL unset). */
  mailbox?: FakeMailbox;
  /** Base URL for links in e-mail (PUBLIC_URL). */
  publicUrl?: string;
  /** Where photo files go; default from env (PHOTO_STORAGE, local disk under .data/photos). */
  photoStorage?: PhotoStorage;
  /** The background job queue (server/jobs): e-mail goes through its outbox, photo renditions through its worker. */
  jobs?: Jobs;
  /** Host names served besides loopback and PUBLIC_URL's host (default: ALLOWED_HOSTS). */
  allowedHosts?: string[];
  /** Where request logs go (default: the process's JSON logger on stdout). */
  logger?: Logger;
  /** The process's metrics (serve() shares them with the job queue and METRICS_PORT); default: the app's own. */
  metrics?: Metrics;
  /** Bearer token that may read /api/metrics without an admin session (default: METRICS_TOKEN). */
  metricsToken?: string;
}

/** The app without a job queue cannot make photo renditions; say so instead of failing obscurely. */
const missingJobs = () =>
  ({
    enqueue: async () => {
      throw new AppError(503, "no_job_queue", "Background jobs are not running on this server.");
    },
  }) as unknown as Jobs;

export function createApp(deps: AppDeps) {
  const { db } = deps;
  const app = express();
  app.disable("x-powered-by");
  // No ETag on what res.send/res.json answer: every API answer is no-store (below), so no browser or proxy keeps a
  // copy to revalidate, and Express would hash every body for nothing (SHA-1 of 226 kB: 0.13 ms a request).
  // Static files keep theirs (serve-static sets its own).
  app.set("etag", false);
  if (deps.trustProxy) app.set("trust proxy", 1);
  const lucia = createLucia(db);
  const photoStorage = deps.photoStorage ?? storageFromEnv();
  const mail = {
    db,
    mailer: deps.mailer ?? unconfiguredMailer(),
    publicUrl: (deps.publicUrl ?? "http://127.0.0.1:3000").replace(/\/+$/, ""),
    jobs: deps.jobs,
  };
  // First: every request gets its id (X-Request-Id), its log lines and its timing, refusals included.
  app.use(requestLogging({ logger: deps.logger ?? rootLog, trustProxy: !!deps.trustProxy }));
  const metrics = deps.metrics ?? createMetrics({ db, jobs: deps.jobs });
  if (deps.jobs && !deps.jobs.onJobEnd) deps.jobs.onJobEnd = metrics.jobEnded;
  app.use(metrics.http);

  app.use(securityHeaders({ https: mail.publicUrl.startsWith("https:") }));

  // Nothing under /api may be kept by a browser or a proxy: probes, session answers and data alike.
  app.use("/api", (_req, res, next) => {
    res.setHeader("Cache-Control", "no-store");
    next();
  });

  // Probes come from load balancers that address the instance by its own IP, so they are
  // answered before the host allow-list. They say nothing a caller could use.
  // The probes ask the database on a connection of their own (probeDbFor): under load every
  // connection of the app's pool is busy, and a probe queued behind the work measured the queue.
  const probeDb = probeDbFor(db);
  const ready = readinessCheck({
    db: probeDb,
    storage: photoStorage,
    jobs: deps.jobs,
    draining: () => app.locals.draining === true,
    // What a caller would see: the probe's own connection says the database answers; the app pool's counters say
    // whether a request needing it now would be served or refused.
    pool: () => poolState(db),
  });
  app.get("/api/health", async (_req, res) => {
    const { db: state } = await databaseState(probeDb);
    res.status(state === "up" ? 200 : 503).json({ ok: state === "up", db: state });
  });
  app.get("/api/health/live", (_req, res) => {
    res.json({ ok: true });
  });
  app.get("/api/health/ready", async (_req, res) => {
    const r = await ready();
    res.status(r.ok ? 200 : 503).json(r);
  });

  app.use(
    hostAllowlist(
      allowedHostsFrom({
        publicUrl: mail.publicUrl,
        extra: deps.allowedHosts ?? parseHostList(process.env.ALLOWED_HOSTS),
      }),
    ),
  );

  // brotli or gzip for JSON, HTML, JS and CSS (a 345 KiB entry and MBs of JSON went raw). Downloads
  // (Content-Disposition: attachment) stream uncompressed with their own back-pressure; images are
  // already compressed and the `compression` package's default filter leaves them alone. A whole answer up to
  // 128 kB is compressed in one call on the loop, the rest as a stream off it (server/middleware/compress.ts).
  app.use(answerCompression((req, res) => !res.getHeader("Content-Disposition") && compression.filter(req, res)));

  const api = Router();
  api.use("/sites/:siteId/inventory/import", express.json({ limit: "2mb" })); // a CSV file sent as JSON {csv}
  api.use(express.json({ limit: "1mb" }));
  api.use(originCheck());
  api.use(sessionMiddleware(lucia));
  const metricsToken = deps.metricsToken ?? process.env.METRICS_TOKEN;
  // For an instance admin, or a scraper with the bearer METRICS_TOKEN (or METRICS_PORT, server/index.ts).
  api.get(
    "/metrics",
    (req, res, next) =>
      hasMetricsToken(req.get("authorization"), metricsToken) ? next() : requireAdmin(req, res, next),
    async (_req, res) => {
      res.set("Content-Type", metrics.contentType).send(await metrics.text());
    },
  );
  const limiters = createLimiters(db);
  // Each domain router behind a gate that lets in only the paths its own routes could match (pathGate), so a
  // request is no longer matched against every route of the routers mounted before its own. Order unchanged.
  api.use(pathGate(authRoutes(db, lucia, { mail, limiters })));
  api.use(pathGate(siteRoutes(db)));
  api.use(pathGate(photoRoutes(db, photoStorage, deps.jobs ?? missingJobs())));
  api.use(pathGate(readingRoutes(db)));
  api.use(pathGate(inventoryRoutes(db)));
  api.use(pathGate(invitationRoutes(mail, lucia, limiters)));
  api.use(pathGate(passwordResetRoutes(mail, lucia, limiters)));
  api.use(pathGate(notificationRoutes(db)));
  api.use(pathGate(mailboxRoutes(deps.mailbox)));
  api.use(pathGate(defectRoutes(db, mail)));
  api.use(pathGate(partsRoutes(db, photoStorage, mail)));
  api.use(pathGate(reportRoutes(db, photoStorage, mail.publicUrl)));
  api.use(pathGate(preparedFileRoutes(db, photoStorage, deps.jobs ?? missingJobs())));
  api.use(pathGate(rtsRoutes(db)));
  api.use((_req, _res, next) => next(new AppError(404, "not_found", "No such API route.")));
  api.use(errorHandler);

  app.use("/api", api);

  if (deps.clientDir && existsSync(deps.clientDir)) {
    const dir = deps.clientDir;
    // Vite names every built asset by its content hash: cache those for a year as immutable. index.html
    // (and anything unhashed) is revalidated each time, so a new build is picked up at once.
    // The build writes each text asset beside itself compressed once, at brotli's and gzip's best (vite.config.ts):
    // a browser that accepts either gets those bytes as they are, smaller than compressing on each request at a
    // speed fit for answers and without the server's time per request; anything else gets the file itself.
    app.use(
      "/assets",
      expressStaticGzip(join(dir, "assets"), {
        enableBrotli: true,
        orderPreference: ["br", "gzip"],
        index: false,
        serveStatic: { index: false, maxAge: "365d", immutable: true, fallthrough: false },
      }),
    );
    app.use(
      expressStaticGzip(dir, {
        enableBrotli: true,
        orderPreference: ["br", "gzip"],
        index: false,
        serveStatic: { index: false, maxAge: 0, setHeaders: (res) => res.setHeader("Cache-Control", "no-cache") },
      }),
    );
    app.get("/{*splat}", (_req, res) =>
      res.sendFile(join(dir, "index.html"), { headers: { "Cache-Control": "no-cache" } }),
    );
  }
  app.use(plainErrorPage);
  return app;
}
