import type { Kysely } from "kysely";
import { newToken } from "../one-time-token";
import type { Database } from "../../db/types";
import type { SeedContext } from "./context";

/**
 * One pending invitation on the demo site (a fictional newcomer), so the crew page shows
 * the list. Its token is thrown away: Resend makes a working link in the local mailbox.
 */
export async function seedInvitations(trx: Kysely<Database>, ctx: SeedContext) {
  const { hash } = newToken();
  await trx
    .insertInto("invitations")
    .values({
      siteId: ctx.siteId,
      email: "newcomer@tideline.test",
      role: "volunteer",
      tokenHash: hash,
      invitedBy: ctx.people["curator@tideline.test"],
      expiresAt: new Date(Date.now() + 7 * 24 * 3600 * 1000),
      sendStatus: "sent",
      lastSentAt: new Date(),
    })
    .execute();
}
