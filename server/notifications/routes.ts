import { Router } from "express";
import {
  NOTIFICATION_LABELS,
  notificationKeyParam,
  notificationsFor,
  setNotificationBody,
} from "../../src/schemas/account";
import { listMemberships } from "../auth/repository";
import { AppError } from "../errors";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { requireUser } from "../middleware/roles";
import { getPrefs, setPref } from "./prefs";

export function notificationRoutes(db: Db) {
  const r = Router();
  /** Only the e-mails one of the person's roles (on any site) receives: a viewer is offered none. */
  const received = async (userId: string) => notificationsFor((await listMemberships(db, userId)).map((m) => m.role));
  const send = async (userId: string) => {
    const [prefs, keys] = await Promise.all([getPrefs(db, userId), received(userId)]);
    return { prefs: keys.map((key) => ({ key, enabled: prefs[key] })) };
  };

  r.get("/account/notifications", requireUser, async (_req, res) => {
    res.json(await send(res.locals.user!.id));
  });

  // One switch per request: two tabs flipping different switches never undo each other.
  r.put("/account/notifications/:key", requireUser, async (req, res) => {
    const { key } = notificationKeyParam.parse(req.params);
    const { enabled } = setNotificationBody.parse(req.body);
    const userId = res.locals.user!.id;
    if (!(await received(userId)).includes(key))
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
    res.json(await send(res.locals.user!.id));
  });

  return r;
}
