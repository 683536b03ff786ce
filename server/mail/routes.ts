import { Router } from "express";
import { AppError } from "../errors";
import { requireAdmin } from "../middleware/roles";
import type { FakeMailbox } from "./fake-smtp";

/**
 * The local fake server's messages, for instance admins, and only while the fake server
 * runs (SMTP_URL unset): with a real provider these routes answer 404.
 */
export function mailboxRoutes(mailbox: FakeMailbox | undefined) {
  const r = Router();
  const active = () => {
    if (!mailbox)
      throw new AppError(404, "not_found", "There is no local mailbox: e-mail goes to a real mail server (SMTP_URL).");
    return mailbox;
  };
  r.get("/admin/mailbox", requireAdmin, (_req, res) => {
    res.json({ messages: active().list() });
  });
  r.delete("/admin/mailbox", requireAdmin, (_req, res) => {
    active().clear();
    res.json({ messages: [] });
  });
  return r;
}
