// `npm run rts:overdue [-- --dry-run] [--now 2026-12-02T09:00:00Z]`: e-mails the qualified
// person of every live stage whose watch check is overdue, once per overdue check. Meant
// for a scheduler every 10 minutes, e.g. cron:
//   */10 * * * *  cd /srv/tideline && npm run rts:overdue >> /var/log/tideline-rts.log 2>&1
// With SMTP_URL unset it hands the messages to the local fake server of a running
// `npm start` (127.0.0.1:SMTP_PORT), so they show on the admin's mailbox page.
import { connect } from "node:net";
import { parseArgs } from "node:util";
import { smtpMailer, type Mailer } from "../mail/mailer";
import { DEFAULT_SMTP_PORT, publicUrlFromEnv } from "../mail/setup";
import { sendOverdueWatchNotices } from "../return-to-service/overdue";
import { log, prepareDatabase } from "./prepare";

const { values } = parseArgs({ options: { "dry-run": { type: "boolean", default: false }, now: { type: "string" } } });
const now = values.now ? new Date(values.now) : new Date();
if (Number.isNaN(now.getTime())) {
  console.error("--now must be a date, e.g. 2026-12-02T09:00:00Z");
  process.exit(2);
}
const listening = (port: number) =>
  new Promise<boolean>((resolve) => {
    const s = connect(port, "127.0.0.1", () => (s.end(), resolve(true)));
    s.on("error", () => resolve(false));
  });
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
  log(`SMTP_URL is unset and no local mail server answers on 127.0.0.1:${port}; printing the notices instead`);
  return printer();
}

const { local, db } = await prepareDatabase("dev", undefined, { seed: false });
const mailer = await pickMailer();
try {
  const r = await sendOverdueWatchNotices(
    { db, mailer, publicUrl: publicUrlFromEnv(Number(process.env.PORT ?? 3000)) },
    now,
  );
  log(
    `overdue watch checks: ${r.checked} live stage(s), ${r.overdue} overdue, ${r.sent} sent, ${r.failed} failed, ${r.skipped} skipped`,
  );
  if (r.failed) process.exitCode = 1;
} finally {
  mailer.close();
  await db.destroy();
  local.stop();
}
