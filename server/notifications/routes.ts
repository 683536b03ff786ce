import { Router } from "express";
import { notificationKeyParam, setNotificationBody } from "../../src/schemas/account";
import type { Db } from "../db";
import { requireUser } from "../middleware/roles";
import { preferencesOf, switchPreference } from "./prefs-service";

export function notificationRoutes(db: Db) {
  const r = Router();

  r.get("/account/notifications", requireUser, async (_req, res) => {
    res.json(await preferencesOf(db, res.locals.user!.id));
  });

  // One switch per request: two tabs flipping different switches never undo each other.
  r.put("/account/notifications/:key", requireUser, async (req, res) => {
    const { key } = notificationKeyParam.parse(req.params);
    const { enabled } = setNotificationBody.parse(req.body);
    const userId = res.locals.user!.id;
    await switchPreference(db, userId, key, enabled);
    res.json(await preferencesOf(db, userId));
  });

  return r;
}
