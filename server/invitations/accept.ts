/** The invitee's side of an invitation: look at it, then accept it with a new or an existing account. */
import { acceptExistingAccountBody, acceptNewAccountBody } from "../../src/schemas/invitations";
import { recordAudit } from "../audit";
import { hashPassword, verifyPassword } from "../auth/password";
import { accountByEmail, addAccount } from "../auth/service";
import { suspendedRefusal } from "../auth/suspension";
import type { Db } from "../db";
import { AppError } from "../errors";
import { hashToken } from "../one-time-token";
import { joinByInvitation } from "../sites/service";
import * as repo from "./repository";

const gone = (code: string, message: string) => new AppError(410, code, message);

/** Unknown links get 404; used, revoked and expired ones 410 with a reason the holder can act on. */
function usable<T extends { acceptedAt: Date | null; revokedAt: Date | null; expiresAt: Date }>(row: T | undefined): T {
  if (!row)
    throw new AppError(
      404,
      "invitation_not_found",
      "This invitation link is not valid. Check that the whole link was copied.",
    );
  if (row.acceptedAt)
    throw gone(
      "invitation_used",
      "This invitation has already been used. Sign in instead, or ask the curator for a new one.",
    );
  if (row.revokedAt) throw gone("invitation_revoked", "This invitation was withdrawn by the curator.");
  if (row.expiresAt.getTime() <= Date.now())
    throw gone("invitation_expired", "This invitation has expired. Ask the curator to send it again.");
  return row;
}

export async function previewInvitation(db: Db, token: string) {
  const row = usable(await repo.findByTokenHash(db, hashToken(token)));
  return {
    siteName: row.siteName,
    role: row.role,
    email: row.email,
    invitedByName: row.invitedByName,
    expiresAt: row.expiresAt.toISOString(),
    accountExists: !!(await accountByEmail(db, row.email)),
  };
}

/**
 * One transaction with the invitation row locked, so a link accepted twice at once
 * still makes one account. An address that already has an account proves it with its
 * password; otherwise the invitee chooses a name and password.
 */
export async function acceptInvitation(db: Db, token: string, body: { name?: string; password: string }) {
  return db.transaction().execute(async (trx) => {
    const inv = usable(await repo.findByTokenHash(trx, hashToken(token), true));
    const existing = await accountByEmail(trx, inv.email);
    let userId: string;
    if (existing) {
      const { password } = acceptExistingAccountBody.parse(body);
      if (!(await verifyPassword(existing.passwordHash, password)))
        throw new AppError(401, "bad_credentials", "That password does not match the account for this address.", {
          password: "Wrong password",
        });
      // An invitation does not bring back an account an instance admin suspended (server/auth/suspension.ts).
      if (existing.suspendedAt) throw suspendedRefusal();
      userId = existing.id;
    } else {
      const { name, password } = acceptNewAccountBody.parse(body);
      userId = (
        await addAccount(trx, { email: inv.email, name, passwordHash: await hashPassword(password), isAdmin: false })
      ).id;
    }
    await joinByInvitation(trx, inv.siteId, userId, inv.role, inv.id);
    await repo.markAccepted(trx, inv.id, userId);
    await recordAudit(trx, {
      siteId: inv.siteId,
      entityType: "invitation",
      entityId: inv.id,
      action: "accepted",
      actorId: userId,
      after: { role: inv.role },
    });
    return { userId, siteId: inv.siteId };
  });
}
