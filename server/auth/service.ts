import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError } from "../errors";
import { inBackground } from "../mail/background";
import type { MailDeps } from "../mail/mailer";
import { sendSignInLockedAlert } from "./alerts";
import type { AppLucia } from "./lucia";
import { verifyPassword } from "./password";
import { suspendedRefusal } from "./suspension";
import { findUserByEmail, findUserById, insertUser, listUsers, setPasswordHash } from "./repository";
import { accountKey, countFailure, LIMITS, refuseIfSpent, type Limiters } from "./throttle";

/**
 * Signs a person in and returns the new session with the user. Throttled per account and per
 * address: failures are counted; once either has spent its allowance, every attempt (right
 * password or not) gets 429 until the window ends. A success clears the account's count. The
 * owner hears once per lock, by e-mail.
 */
export async function signIn(
  db: Db,
  deps: { lucia: AppLucia; limiters: Limiters; mail: MailDeps },
  attempt: { email: string; password: string; ip: string },
) {
  const { lucia, limiters } = deps;
  const { email, password, ip } = attempt;
  const acct = accountKey(email);
  await refuseIfSpent(limiters.signInAddress, ip, "Too many failed sign-ins from this network.");
  await refuseIfSpent(limiters.signInAccount, acct, "Too many failed sign-ins for this account.");
  const user = await findUserByEmail(db, email);
  const ok = await verifyPassword(user?.passwordHash ?? null, password);
  if (!user || !ok) {
    const [failures] = await Promise.all([
      countFailure(limiters.signInAccount, acct),
      countFailure(limiters.signInAddress, ip),
    ]);
    if (failures === LIMITS.signInAccount.points) {
      const lockMinutes = LIMITS.signInAccount.duration / 60;
      inBackground("sign-in lock e-mail", () => sendSignInLockedAlert(deps.mail, acct, { failures, lockMinutes }));
    }
    throw new AppError(401, "bad_credentials", "That e-mail and password do not match an account.");
  }
  // Said only to someone who knows the password: a stranger learns no more than from a wrong one.
  if (user.suspendedAt) throw suspendedRefusal();
  await limiters.signInAccount.delete(acct);
  const session = await lucia.createSession(user.id, {});
  await recordAudit(db, {
    siteId: null,
    entityType: "user",
    entityId: user.id,
    action: "signed_in",
    actorId: user.id,
  });
  return { session, user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin } };
}

/*
 * The auth domain owns `users`: other domains (sites, invitations, password reset) find, add and re-key accounts
 * through these, inside their own transaction (pass `trx`).
 */

/** The account with this e-mail (case-insensitive), or undefined. */
export const accountByEmail = (db: Db, email: string) => findUserByEmail(db, email);

/** The account with this id, or undefined. */
export const accountById = (db: Db, userId: string) => findUserById(db, userId);
/** Every account, by name (the instance admin's list). */
export const allAccounts = (db: Db) => listUsers(db);

/** Adds an account (sign-up paths: an admin's form, an accepted invitation); the caller audits. */
export const addAccount = (
  trx: Db,
  u: { email: string; name: string; passwordHash: string | null; isAdmin: boolean },
) => insertUser(trx, u);

/** Sets an account's password hash (a completed reset); the caller ends its sessions. */
export const setPassword = (trx: Db, userId: string, passwordHash: string) =>
  setPasswordHash(trx, userId, passwordHash);
