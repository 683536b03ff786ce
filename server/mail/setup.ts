/**
 * Mail from the environment: SMTP_URL names a real provider; without it the process
 * starts the local fake server (127.0.0.1:SMTP_PORT, default 2525) and keeps what it
 * receives for the admin-only mailbox page. PUBLIC_URL is the base of every link.
 */
import { startFakeSmtp, type FakeMailbox } from "./fake-smtp";
import { smtpMailer, type Mailer } from "./mailer";
import { log } from "../log";
import { paths } from "../../src/config/paths";

export const DEFAULT_SMTP_PORT = 2525;

export interface MailSetup {
  mailer: Mailer;
  /** Present only when the fake server is running. */
  mailbox?: FakeMailbox;
  publicUrl: string;
  stop(): Promise<void>;
}

export const publicUrlFromEnv = (port: number, env = process.env) =>
  (env.PUBLIC_URL ?? `http://127.0.0.1:${port}`).replace(/\/+$/, "");

export async function mailFromEnv(opts: { port: number; env?: NodeJS.ProcessEnv }): Promise<MailSetup> {
  const env = opts.env ?? process.env;
  const publicUrl = publicUrlFromEnv(opts.port, env);
  if (env.SMTP_URL) {
    const mailer = smtpMailer({ url: env.SMTP_URL, from: env.MAIL_FROM });
    return { mailer, publicUrl, stop: async () => mailer.close() };
  }
  const fake = await startFakeSmtp({ port: Number(env.SMTP_PORT ?? DEFAULT_SMTP_PORT) });
  const mailer = smtpMailer({ url: fake.url, from: env.MAIL_FROM });
  log.info(
    `SMTP_URL is unset: e-mail goes to the local fake server on ${fake.url} (read it at ${publicUrl}${paths.mailbox.href()} as an admin); nothing leaves this machine`,
  );
  return {
    mailer,
    mailbox: fake.mailbox,
    publicUrl,
    async stop() {
      mailer.close();
      await fake.stop();
    },
  };
}
