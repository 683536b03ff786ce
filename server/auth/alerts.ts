/**
 * The e-mail to an account's owner when its sign-in is locked after repeated wrong
 * passwords, through the e-mail outbox when the app runs its job queue. Runs after the answer
 * has gone out: an unknown address and a known one look the same from outside.
 */
import { compose } from "../mail/compose";
import type { MailDeps } from "../mail/mailer";
import { sendOrQueue } from "../mail/outbox";
import { findUserByEmail } from "./repository";
import { paths } from "../../src/config/paths";

export async function sendSignInLockedAlert(
  deps: MailDeps,
  email: string,
  p: { failures: number; lockMinutes: number },
) {
  const user = await findUserByEmail(deps.db, email);
  if (!user) return { sent: false as const, reason: "unknown_address" };
  if (user.suspendedAt) return { sent: false as const, reason: "suspended" };
  const msg = compose({
    subject: "Repeated failed sign-ins to your Tideline account",
    greeting: `Hello ${user.name},`,
    body: [
      `There were ${p.failures} sign-in attempts with a wrong password for this address. Signing in to this account is paused for ${p.lockMinutes} minutes.`,
      "If that was you, wait and try again, or set a new password. If it was not, set a new password now: that also signs out every other session.",
    ],
    action: { label: "Set a new password", url: `${deps.publicUrl}${paths.resetRequest.href()}` },
    footer: ["You get this message at most once per lock, however many attempts are made."],
  });
  const r = await sendOrQueue(deps, { to: user.email, ...msg });
  return { sent: r.ok };
}
