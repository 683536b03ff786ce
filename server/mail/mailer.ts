/**
 * The one way Tideline sends e-mail: nodemailer over SMTP. A real provider is named by
 * SMTP_URL; in development and tests the URL points at the local fake server
 * (server/mail/fake-smtp.ts). A failure is returned, never thrown, so the caller can
 * keep its action and mark the message "not sent".
 */
import nodemailer from "nodemailer";
import addressparser from "nodemailer/lib/addressparser";
import type { Db } from "../db";
import type { Jobs } from "../jobs";
import { log } from "../log";

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html: string;
  /** Shown as the sender's name, e.g. "Ines Marrow via Tideline"; the address stays MAIL_FROM's. */
  fromName?: string;
}
export type SendResult = { ok: true } | { ok: false; error: string };

export interface Mailer {
  send(msg: MailMessage): Promise<SendResult>;
  close(): void;
}

/** What the mail-sending use cases need: the database, a mailer and the base of links. */
export interface MailDeps {
  db: Db;
  mailer: Mailer;
  /** Base URL of the pages people open from an e-mail, without a trailing slash. */
  publicUrl: string;
  /** The job queue: with it, e-mail goes through the outbox (server/mail/outbox.ts); without, it is sent at once. */
  jobs?: Jobs;
}

export const DEFAULT_FROM = '"Tideline" <no-reply@tideline.invalid>';

export function parseFrom(from: string): { name: string; address: string } {
  const [first] = addressparser(from, { flatten: true });
  if (!first?.address) throw new Error(`MAIL_FROM is not an e-mail address: ${from}`);
  return { name: first.name || "Tideline", address: first.address };
}

export function smtpMailer(opts: { url: string; from?: string }): Mailer {
  const from = parseFrom(opts.from ?? DEFAULT_FROM);
  // Short timeouts: a dead provider must not hold a curator's request for minutes.
  const transport = nodemailer.createTransport(opts.url, {
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  } as Record<string, unknown>);
  return {
    async send(msg) {
      try {
        const info = await transport.sendMail({
          from: { name: msg.fromName ?? from.name, address: from.address },
          to: msg.to,
          subject: msg.subject,
          text: msg.text,
          html: msg.html,
        });
        if (info.rejected?.length) return fail(msg, `The mail server refused ${info.rejected.join(", ")}`);
        return { ok: true };
      } catch (e) {
        return fail(msg, e instanceof Error ? e.message : String(e));
      }
    },
    close: () => transport.close(),
  };
}

/** For tests that do not look at e-mail: keeps what would have been sent. */
export function memoryMailer(): Mailer & { sent: MailMessage[] } {
  const sent: MailMessage[] = [];
  return { sent, send: async (m) => (sent.push(m), { ok: true }), close() {} };
}

/** Used when no mailer was given: every send fails with a clear reason. */
export const unconfiguredMailer = (): Mailer => ({
  send: async (m) => fail(m, "No mail transport is configured."),
  close() {},
});

function fail(msg: MailMessage, error: string): SendResult {
  // The reason is logged for the operator; the recipient's address identifies the message.
  log.error({ to: msg.to, subject: msg.subject, reason: error }, "e-mail could not be sent");
  return { ok: false, error };
}
