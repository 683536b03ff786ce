import { Router } from "express";
import { NOTIFICATION_KEYS, notificationKeyParam, setNotificationBody } from "../../src/schemas/account";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { requireUser } from "../middleware/roles";
import { getPrefs, setPref } from "./prefs";

export function notificationRoutes(db: Db) {
  const r = Router();
  const send = async (userId: string) => {
    const prefs = await getPrefs(db, userId);
    return { prefs: NOTIFICATION_KEYS.map((key) => ({ key, enabled: prefs[key] })) };
  };

  r.get("/account/notifications", requireUser, async (_req, res) => {
    res.json(await send(res.locals.user!.id));
  });

  // One switch per request: two tabs flipping different switches never undo each other.
  r.put("/account/notifications/:key", requireUser, async (req, res) => {
    const { key } = notificationKeyParam.parse(req.params);
    const { enabled } = setNotificationBody.parse(req.body);
    const userId = res.locals.user!.id;
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
    res.json(await send(res.locals.user!.id));
  });

  return r;
}
