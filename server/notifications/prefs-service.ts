import { NOTIFICATION_LABELS, notificationsFor, type NotificationKey } from "../../src/schemas/account";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError } from "../errors";
import { membershipsOf } from "../sites/reads";
import { getPrefs, optedOut, setPref } from "./prefs-repository";

/** Only the e-mails one of the person's roles (on any site) receives: a viewer is offered none. */
const received = async (db: Db, userId: string) =>
  notificationsFor((await membershipsOf(db, userId)).map((m) => m.role));

/** A person's switches, one per e-mail their roles receive (on unless switched off). */
export async function preferencesOf(db: Db, userId: string) {
  const [prefs, keys] = await Promise.all([getPrefs(db, userId), received(db, userId)]);
  return { prefs: keys.map((key) => ({ key, enabled: prefs[key] })) };
}

/** Sets one switch (audited); 422 for an e-mail none of the person's roles receives. */
export async function switchPreference(db: Db, userId: string, key: NotificationKey, enabled: boolean) {
  if (!(await received(db, userId)).includes(key))
    throw new AppError(
      422,
      "not_received",
      `None of your roles receives "${NOTIFICATION_LABELS[key].label}", so there is nothing to switch.`,
    );
  await db.transaction().execute(async (trx) => {
    await setPref(trx, userId, key, enabled);
    await recordAudit(trx, {
      siteId: null,
      entityType: "notification_pref",
      entityId: userId,
      action: "update",
      actorId: userId,
      after: { [key]: enabled },
    });
  });
}

/** The users among `userIds` who have switched `key` off (for senders outside this domain). */
export const optedOutOf = (db: Db, userIds: string[], key: NotificationKey) => optedOut(db, userIds, key);
