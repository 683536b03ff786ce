/**
 * An instance admin makes another account an instance admin, or takes that away (someone who ran the instance moves
 * on to a crew's work, or leaves). Never their own: an instance keeps at least the admin who acted, and no one
 * locks themselves out by a slip. It takes effect on the account's next request: every request reads the account's
 * standing with its session (server/auth/session-repository.ts). Not a suspended account (reinstate it first); taking
 * the standing away from one is allowed. Audited.
 */
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, notFound } from "../errors";
import { lockUserById, setInstanceAdmin } from "./repository";

export async function setAdmin(db: Db, actorId: string, userId: string, isAdmin: boolean) {
  if (actorId === userId)
    throw new AppError(
      409,
      "own_account",
      "You cannot change your own instance admin standing: another instance admin can.",
    );
  await db.transaction().execute(async (trx: Db) => {
    const user = await lockUserById(trx, userId);
    if (!user) throw notFound("That account");
    // A suspended account cannot sign in; making it an admin would hand the powers back the moment it is
    // reinstated, decided by whoever reinstates it without seeing that. Taking admin away stays allowed.
    if (isAdmin && user.suspendedAt)
      throw new AppError(
        409,
        "account_suspended",
        `${user.name}'s account is suspended: reinstate it first, then make them an instance admin.`,
      );
    if (!(await setInstanceAdmin(trx, userId, isAdmin)))
      throw new AppError(
        409,
        "admin_unchanged",
        isAdmin
          ? `${user.name} is an instance admin already: another admin made them one a moment ago.`
          : `${user.name} is not an instance admin: another admin took it away a moment ago.`,
      );
    await recordAudit(trx, {
      siteId: null,
      entityType: "user",
      entityId: userId,
      action: isAdmin ? "admin_granted" : "admin_removed",
      actorId,
    });
  });
}
