// `npm run worker`: a worker alone — background jobs and schedules, no web server — for
// deployments that scale web instances (TIDELINE_WORKER=off) and workers apart. With
// DATABASE_URL it uses that database; otherwise the embedded one of `npm start`.
// Without SMTP_URL it hands e-mail to the local fake mail server of a running `npm start`
// (127.0.0.1:SMTP_PORT), or starts its own when none answers.
import { connect } from "node:net";
import { startMetricsListener, stopOnSignals } from "../index";
import { createMetrics } from "../observability/metrics";
import { startJobs } from "../jobs/registry";
import { log as logger } from "../log";
import { smtpMailer } from "../mail/mailer";
import { DEFAULT_SMTP_PORT, mailFromEnv, publicUrlFromEnv } from "../mail/setup";
import { storageFromEnv } from "../photos/storage";
import { prepareDatabase } from "./prepare";

const listening = (port: number) =>
  new Promise<boolean>((resolve) => {
    const s = connect(port, "127.0.0.1", () => (s.end(), resolve(true)));
    s.on("error", () => resolve(false));
  });

const { local, db } = await prepareDatabase("dev", undefined, { seed: false });
const webPort = Number(process.env.PORT ?? 3000);
const smtpPort = Number(process.env.SMTP_PORT ?? DEFAULT_SMTP_PORT);
const mail =
  !process.env.SMTP_URL && (await listening(smtpPort))
    ? (() => {
        const mailer = smtpMailer({ url: `smtp://127.0.0.1:${smtpPort}`, from: process.env.MAIL_FROM });
        return { mailer, publicUrl: publicUrlFromEnv(webPort), stop: async () => mailer.close() };
      })()
    : await mailFromEnv({ port: webPort });
const jobs = await startJobs(
  { db, mailer: mail.mailer, publicUrl: mail.publicUrl, photoStorage: storageFromEnv() },
  { work: true },
);
const metrics = createMetrics({ db, jobs });
jobs.onJobEnd = metrics.jobEnded;
const metricsServer = await startMetricsListener(metrics);
logger.info("worker running: background jobs and schedules, no web server (Ctrl-C stops it)");
stopOnSignals(
  {
    server: undefined as never,
    jobs,
    stop: () =>
      jobs
        .stop(Number(process.env.SHUTDOWN_TIMEOUT_MS ?? 25_000))
        .then(() => metricsServer?.close())
        .then(() => mail.stop()),
  },
  async () => {
    await db.destroy();
    local.stop();
  },
);
