/**
 * A signed-in person sees in how many places their account is signed in and signs out everywhere but here: the
 * phone left in a machinery space, a shared laptop in the site office. (A password change does the same and more;
 * an instance admin can suspend the account when its owner cannot reach a browser, server/auth/suspension.ts.)
 */
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { countSessionsOf, endOtherSessionsOf } from "./session-repository";

export const signedInPlaces = (db: Db, userId: string) => countSessionsOf(db, userId);

export async function signOutElsewhere(db: Db, userId: string, currentSessionId: string) {
  return db.transaction().execute(async (trx: Db) => {
    const ended = await endOtherSessionsOf(trx, userId, currentSessionId);
    await recordAudit(trx, {
      siteId: null,
      entityType: "user",
      entityId: userId,
      action: "signed_out_elsewhere",
      actorId: userId,
      after: { ended },
    });
    return ended;
  });
}
