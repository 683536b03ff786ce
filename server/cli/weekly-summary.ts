// `npm run mail:weekly [-- --dry-run] [--now 2026-12-07T07:00:00Z]`: the weekly summary
// for every site's curators, for a scheduler (cron, a systemd timer) to run once a week.
// With SMTP_URL unset it hands the messages to the local fake server of a running
// `npm start` / `npm run dev` (127.0.0.1:SMTP_PORT), so they show on the mailbox page.
import { connect } from "node:net";
import { parseArgs } from "node:util";
import { smtpMailer, type Mailer } from "../mail/mailer";
import { DEFAULT_SMTP_PORT, publicUrlFromEnv } from "../mail/setup";
import { sendWeeklySummaries } from "../notifications/weekly";
import { log, prepareDatabase } from "./prepare";

const { values } = parseArgs({ options: { "dry-run": { type: "boolean", default: false }, now: { type: "string" } } });
const now = values.now ? new Date(values.now) : new Date();
if (Number.isNaN(now.getTime())) {
  console.error("--now must be a date, e.g. 2026-12-07T07:00:00Z");
  process.exit(2);
}

const listening = (port: number) =>
  new Promise<boolean>((resolve) => {
    const s = connect(port, "127.0.0.1", () => (s.end(), resolve(true)));
    s.on("error", () => resolve(false));
  });

/** Prints each message instead of sending it. */
const printer = (): Mailer => ({
  async send(m) {
    console.log(`\n── To: ${m.to}\n── Subject: ${m.subject}\n${m.text}`);
    return { ok: true };
  },
  close() {},
});

async function pickMailer(): Promise<Mailer> {
  if (values["dry-run"]) return printer();
  if (process.env.SMTP_URL) return smtpMailer({ url: process.env.SMTP_URL, from: process.env.MAIL_FROM });
  const port = Number(process.env.SMTP_PORT ?? DEFAULT_SMTP_PORT);
  if (await listening(port)) return smtpMailer({ url: `smtp://127.0.0.1:${port}`, from: process.env.MAIL_FROM });
  log(`SMTP_URL is unset and no local mail server answers on 127.0.0.1:${port}; printing the summaries instead`);
  return printer();
}

const { local, db } = await prepareDatabase("dev", undefined, { seed: false });
const mailer = await pickMailer();
try {
  const r = await sendWeeklySummaries(
    { db, mailer, publicUrl: publicUrlFromEnv(Number(process.env.PORT ?? 3000)) },
    { now },
  );
  log(`weekly summary: ${r.sites} site(s), ${r.sent} sent, ${r.failed} failed, ${r.switchedOff} switched off`);
  if (r.failed) process.exitCode = 1;
} finally {
  mailer.close();
  await db.destroy();
  local.stop();
}
