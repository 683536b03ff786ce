import { hashPassword } from "../auth/password";
import { accountByEmail, setPassword } from "../auth/service";
import { suspendedRefusal } from "../auth/suspension";
import type { Db } from "../db";
import { AppError } from "../errors";
import { compose } from "../mail/compose";
import type { MailDeps } from "../mail/mailer";
import { queueMail } from "../mail/outbox";
import { hashToken, newToken } from "../one-time-token";
import * as repo from "./repository";
import { log } from "../log";
import { paths } from "../../src/config/paths";

export const RESET_MINUTES = 60;
/** More than this many links in an hour for one account are not sent (a mail-bombing guard). */
const MAX_PER_HOUR = 3;

export const resetUrl = (publicUrl: string, token: string) => `${publicUrl}${paths.resetPassword.href(token)}`;

/**
 * Runs after the answer has gone out (see routes.ts), so an unknown address and a known
 * one look the same from outside; nothing here reaches the caller.
 */
export async function sendResetLink(deps: MailDeps, email: string) {
  const user = await accountByEmail(deps.db, email);
  if (!user) return { sent: false as const, reason: "unknown_address" };
  // A suspended account gets no link: a reset does not bring it back (server/auth/suspension.ts).
  if (user.suspendedAt) return { sent: false as const, reason: "suspended" };
  const hourAgo = new Date(Date.now() - 3600_000);
  if ((await repo.countRecent(deps.db, user.id, hourAgo)) >= MAX_PER_HOUR) {
    log.info({ userId: user.id }, `password reset not sent: ${MAX_PER_HOUR} links already in the last hour`);
    return { sent: false as const, reason: "too_many" };
  }
  const { token, hash } = newToken();
  const reset = { userId: user.id, tokenHash: hash, expiresAt: new Date(Date.now() + RESET_MINUTES * 60_000) };
  const msg = compose({
    subject: "Set a new Tideline password",
    greeting: `Hello ${user.name},`,
    body: [
      "Someone (we hope you) asked to set a new password for this address on Tideline.",
      `The link works once, for ${RESET_MINUTES} minutes. Setting a new password signs you out everywhere else.`,
    ],
    action: { label: "Set a new password", url: resetUrl(deps.publicUrl, token) },
    footer: ["If you did not ask for this, ignore this e-mail: your password stays as it is."],
  });
  const jobs = deps.jobs;
  if (jobs) {
    // The link and its e-mail commit together; the outbox job delivers and retries. One
    // request per account at a time (a transaction-scoped advisory lock), so requests
    // arriving together cannot all pass the hourly count.
    const queued = await deps.db.transaction().execute(async (trx) => {
      await repo.lockResetsOf(trx, user.id);
      if ((await repo.countRecent(trx, user.id, hourAgo)) >= MAX_PER_HOUR) return false;
      await repo.insertReset(trx, reset);
      await queueMail(trx, jobs, { to: user.email, ...msg });
      return true;
    });
    return queued ? { sent: true as const, reason: undefined } : { sent: false as const, reason: "too_many" };
  }
  await repo.insertReset(deps.db, reset);
  const r = await deps.mailer.send({ to: user.email, ...msg });
  return { sent: r.ok, reason: r.ok ? undefined : r.error };
}

function usable<T extends { usedAt: Date | null; expiresAt: Date; suspendedAt: Date | null }>(row: T | undefined): T {
  if (!row) throw new AppError(404, "reset_not_found", "This link is not valid. Ask for a new one.");
  if (row.suspendedAt) throw suspendedRefusal();
  if (row.usedAt)
    throw new AppError(410, "reset_used", "This link has already been used. Ask for a new one if you need it.");
  if (row.expiresAt.getTime() <= Date.now())
    throw new AppError(410, "reset_expired", "This link has expired. Ask for a new one.");
  return row;
}

export async function previewReset(db: Db, token: string) {
  return { email: usable(await repo.findByTokenHash(db, hashToken(token))).email };
}

/** Sets the password and spends every outstanding link; the caller ends the user's sessions. */
export async function completeReset(db: Db, token: string, password: string) {
  const passwordHash = await hashPassword(password);
  return db.transaction().execute(async (trx) => {
    const row = usable(await repo.findByTokenHash(trx, hashToken(token), true));
    await setPassword(trx, row.userId, passwordHash); // users belong to server/auth
    await repo.useAllFor(trx, row.userId);
    return { userId: row.userId };
  });
}
