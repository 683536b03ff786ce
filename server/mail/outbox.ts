/**
 * The e-mail outbox. An action writes its message into `mail_outbox` and enqueues the
 * "mail.send" job in the same transaction, so the two commit together: no e-mail for a
 * rolled-back action, no action whose e-mail is forgotten. The job sends through the
 * Mailer and retries with backoff while the provider is down; a message already sent is
 * never sent again (the job may run twice, the row says it went).
 * Whatever caused a message (an invitation) reads its delivery state from here.
 */
import type { Kysely } from "kysely";
import type { Database, OutboxStatus } from "../../db/types";
import type { Db } from "../db";
import type { Jobs } from "../jobs";
import type { MailMessage, Mailer, SendResult } from "./mailer";
import { findMessage, insertMessage, latestByRef, updateMessage, withdrawWaiting } from "./repository";

export const MAIL_JOB = "mail.send";

export interface MailRef {
  type: string;
  id: string;
}

/** Retries: 10 after the first try, from 30 s doubling (about 8 hours in all); env overrides for tests and operators. */
export const mailRetry = (env = process.env) => ({
  retryLimit: Number(env.TIDELINE_MAIL_RETRY_LIMIT ?? 10),
  retryDelay: Number(env.TIDELINE_MAIL_RETRY_DELAY_SECONDS ?? 30),
  retryBackoff: true,
  expireInSeconds: 120,
});

/** What a message replaced by a newer one for the same record says (a resent invitation's old link). */
export const SUPERSEDED = "Replaced by a newer message before it was delivered.";

/**
 * Writes the message and its job in `trx` (a transaction of the caller's). An older
 * message for the same record still waiting is withdrawn: its link no longer works.
 */
export async function queueMail(trx: Kysely<Database>, jobs: Jobs, msg: MailMessage, ref?: MailRef): Promise<string> {
  if (ref) await withdrawWaiting(trx, ref.type, ref.id, SUPERSEDED);
  const row = await insertMessage(trx, {
    toAddress: msg.to,
    fromName: msg.fromName ?? null,
    subject: msg.subject,
    textBody: msg.text,
    htmlBody: msg.html,
    refType: ref?.type ?? null,
    refId: ref?.id ?? null,
  });
  await jobs.enqueue(MAIL_JOB, { outboxId: row.id }, { trx });
  return row.id;
}

/**
 * With a job queue: queued in the outbox (in `trx` when given, else its own transaction).
 * Without one (a one-off CLI run such as `npm run mail:weekly -- --dry-run`): sent now.
 */
export async function sendOrQueue(
  deps: { db: Db; mailer: Mailer; jobs?: Jobs },
  msg: MailMessage,
  opts: { trx?: Kysely<Database>; ref?: MailRef } = {},
): Promise<SendResult | { ok: true; queued: string }> {
  if (!deps.jobs) return deps.mailer.send(msg);
  const jobs = deps.jobs;
  const queued = opts.trx
    ? await queueMail(opts.trx, jobs, msg, opts.ref)
    : await deps.db.transaction().execute((trx) => queueMail(trx, jobs, msg, opts.ref));
  return { ok: true, queued };
}

/** The handler of "mail.send". */
export function defineMailJobs(jobs: Jobs, deps: { db: Db; mailer: Mailer }) {
  jobs.define<{ outboxId: string }>(
    MAIL_JOB,
    async ({ outboxId }, ctx) => {
      const row = await findMessage(deps.db, outboxId);
      // Sent by an earlier run of this job, or withdrawn: nothing to do.
      if (!row || row.status === "sent" || row.status === "failed") return;
      const r = await deps.mailer.send({
        to: row.toAddress,
        subject: row.subject,
        text: row.textBody,
        html: row.htmlBody,
        fromName: row.fromName ?? undefined,
      });
      if (r.ok) {
        await updateMessage(deps.db, outboxId, {
          status: "sent",
          sentAt: new Date(),
          attempts: row.attempts + 1,
          lastError: null,
        });
        ctx.log.info({ outboxId }, "e-mail sent");
        return;
      }
      const status: OutboxStatus = ctx.lastAttempt ? "failed" : "retrying";
      await updateMessage(deps.db, outboxId, { status, attempts: row.attempts + 1, lastError: r.error.slice(0, 1000) });
      throw new Error(r.error);
    },
    mailRetry(),
  );
}

export interface Delivery {
  status: OutboxStatus;
  lastError: string | null;
  sentAt: Date | null;
  attempts: number;
}

/** The newest message's delivery for each referenced record. */
export async function latestDelivery(db: Db, refType: string, ids: string[]): Promise<Map<string, Delivery>> {
  const out = new Map<string, Delivery>();
  if (!ids.length) return out;
  const rows = await latestByRef(db, refType, ids);
  for (const r of rows)
    out.set(r.refId!, { status: r.status, lastError: r.lastError, sentAt: r.sentAt, attempts: r.attempts });
  return out;
}
