import { NOTIFICATION_KEYS, type NotificationKey } from "../../src/schemas/account";
import type { Db } from "../db";

/** Every notification is on until its user switches it off (a row with enabled = false). */
export async function getPrefs(db: Db, userId: string): Promise<Record<NotificationKey, boolean>> {
  const rows = await db
    .selectFrom("notificationPrefs")
    .select(["key", "enabled"])
    .where("userId", "=", userId)
    .execute();
  const out = Object.fromEntries(NOTIFICATION_KEYS.map((k) => [k, true])) as Record<NotificationKey, boolean>;
  for (const r of rows) out[r.key] = r.enabled;
  return out;
}

export const setPref = (db: Db, userId: string, key: NotificationKey, enabled: boolean) =>
  db
    .insertInto("notificationPrefs")
    .values({ userId, key, enabled })
    .onConflict((oc) => oc.columns(["userId", "key"]).doUpdateSet({ enabled, updatedAt: new Date() }))
    .execute();

/** The users among `userIds` who have switched `key` off. */
export async function optedOut(db: Db, userIds: string[], key: NotificationKey): Promise<Set<string>> {
  if (!userIds.length) return new Set();
  const rows = await db
    .selectFrom("notificationPrefs")
    .select("userId")
    .where("userId", "in", userIds)
    .where("key", "=", key)
    .where("enabled", "=", false)
    .execute();
  return new Set(rows.map((r) => r.userId));
}
