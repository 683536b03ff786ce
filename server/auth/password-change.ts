/**
 * A signed-in person changes their own password. The current password is
 * required, so a session left open on a shared phone cannot take over the account; wrong ones
 * count against the same per-account allowance as sign-in. The change is audited, every session
 * of the person ends (the route then signs this browser in again), and the owner is told by
 * e-mail, with the reset link in case it was not them; the time in the zone the route gives (their sites' own, when
 * they keep one: server/sites/reads.ts accountTimeZone).
 */
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError } from "../errors";
import { compose } from "../mail/compose";
import type { MailDeps } from "../mail/mailer";
import { sendOrQueue } from "../mail/outbox";
import { log } from "../log";
import { hashPassword, verifyPassword } from "./password";
import { findUserById, replacePasswordHash } from "./repository";
import { paths } from "../../src/config/paths";
import { localMinute } from "../../src/domain/local-time";

export const passwordChangedMail = (publicUrl: string, name: string, at: Date, timeZone: string) =>
  compose({
    subject: "Your Tideline password was changed",
    greeting: `Hello ${name},`,
    body: [
      `The password of this Tideline account was changed while signed in, at ${localMinute(at, timeZone)} ${timeZone}.`,
      "Every other place where the account was signed in has been signed out.",
      "If you did not change it, set a new password now with the link below, and tell your site's curator.",
    ],
    action: { label: "Set a new password", url: `${publicUrl}${paths.resetRequest.href()}` },
    footer: ["You get this message every time the password of this account changes."],
  });

export type CheckCurrent = (ok: boolean, email: string) => Promise<void>;

export async function changePassword(
  deps: MailDeps,
  userId: string,
  body: { currentPassword: string; newPassword: string },
  checked: CheckCurrent,
  timeZone = "UTC",
): Promise<void> {
  const user = await findUserById(deps.db, userId);
  if (!user) throw new AppError(401, "unauthenticated", "Sign in first.");
  const ok = await verifyPassword(user.passwordHash, body.currentPassword);
  await checked(ok, user.email);
  if (!ok || !user.passwordHash)
    throw new AppError(400, "wrong_current_password", "That is not your current password.", {
      currentPassword: "That is not your current password",
    });
  const next = await hashPassword(body.newPassword);
  const at = new Date();
  const msg = { to: user.email, ...passwordChangedMail(deps.publicUrl, user.name, at, timeZone) };
  const queued = await deps.db.transaction().execute(async (trx: Db) => {
    if (!(await replacePasswordHash(trx, userId, user.passwordHash!, next)))
      throw new AppError(
        409,
        "password_changed_meanwhile",
        "Your password was changed somewhere else a moment ago. Sign in again with the new one.",
      );
    await recordAudit(trx, {
      siteId: null,
      entityType: "user",
      entityId: userId,
      action: "password_changed",
      actorId: userId,
    });
    // With a job queue the notice commits with the change (the outbox delivers and retries).
    if (deps.jobs) await sendOrQueue(deps, msg, { trx });
    return !!deps.jobs;
  });
  if (!queued) {
    // Without one it goes after the commit; a failed send never undoes the change.
    const r = await deps.mailer.send(msg);
    if (!r.ok) log.warn({ userId, error: r.error }, "password-changed notice not sent");
  }
}
