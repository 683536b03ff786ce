/**
 * An instance admin suspends an account, and reinstates it. Suspended: the account cannot sign in, every session it
 * has ends at once (on every server instance: sessions live in PostgreSQL and a suspended account's are never read,
 * server/auth/session-repository.ts), a password reset or an invitation does not bring it back, and no e-mail goes
 * to it. Everything it recorded keeps its name. For a volunteer who has left the crew, or a phone lost with the
 * account signed in. An admin never suspends their own account (another admin can), so an instance always keeps the
 * admin who acted. Both are audited, the suspension with its reason.
 */
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, notFound } from "../errors";
import { findUserById, suspend, reinstate } from "./repository";
import { endSessionsOf } from "./session-repository";

export async function suspendAccount(db: Db, actorId: string, userId: string, reason: string) {
  if (actorId === userId)
    throw new AppError(
      409,
      "own_account",
      "You cannot suspend your own account: another instance admin can, if it must be.",
    );
  await db.transaction().execute(async (trx: Db) => {
    const user = await findUserById(trx, userId);
    if (!user) throw notFound("That account");
    if (!(await suspend(trx, userId, actorId, reason)))
      throw new AppError(
        409,
        "already_suspended",
        `${user.name}'s account was suspended already, by another admin a moment ago. The list now shows who and why.`,
      );
    await endSessionsOf(trx, userId);
    await recordAudit(trx, {
      siteId: null,
      entityType: "user",
      entityId: userId,
      action: "suspended",
      actorId,
      after: { reason },
    });
  });
}

export async function reinstateAccount(db: Db, actorId: string, userId: string) {
  await db.transaction().execute(async (trx: Db) => {
    const user = await findUserById(trx, userId);
    if (!user) throw notFound("That account");
    if (!(await reinstate(trx, userId)))
      throw new AppError(
        409,
        "already_reinstated",
        `${user.name}'s account is not suspended: another admin reinstated it.`,
      );
    await recordAudit(trx, {
      siteId: null,
      entityType: "user",
      entityId: userId,
      action: "reinstated",
      actorId,
      before: { suspendedAt: user.suspendedAt, reason: user.suspendedReason },
    });
  });
}

/** The refusal a suspended account meets wherever it tries to come back (sign-in, reset, invitation). */
export const suspendedRefusal = () =>
  new AppError(
    403,
    "account_suspended",
    "This account is suspended. Ask your instance's admin if you should have it back.",
  );
