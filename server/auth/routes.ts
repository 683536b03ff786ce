import { Router } from "express";
import { signInBody } from "../../src/schemas/auth";
import { changePasswordBody } from "../../src/schemas/account";
import { changePassword } from "./password-change";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError } from "../errors";
import { inBackground } from "../mail/background";
import type { MailDeps } from "../mail/mailer";
import { requireUser } from "../middleware/roles";
import { setCookie } from "../middleware/session";
import { sendSignInLockedAlert } from "./alerts";
import type { AppLucia } from "./lucia";
import { verifyPassword } from "./password";
import { findUserByEmail, listMemberships } from "./repository";
import { accountKey, countFailure, LIMITS, refuseIfSpent, type Limiters } from "./throttle";

export function authRoutes(db: Db, lucia: AppLucia, opts: { mail: MailDeps; limiters: Limiters }) {
  const r = Router();
  const { limiters } = opts;

  /**
   * Throttled per account and per address: failures are counted; once either has spent
   * its allowance, every attempt (right password or not) gets 429 until the window ends.
   * A success clears the account's count. The owner hears once per lock, by e-mail.
   */
  r.post("/auth/sign-in", async (req, res) => {
    const { email, password } = signInBody.parse(req.body);
    const acct = accountKey(email);
    const ip = req.ip ?? "unknown";
    await refuseIfSpent(limiters.signInAddress, ip, "Too many failed sign-ins from this network.");
    await refuseIfSpent(limiters.signInAccount, acct, "Too many failed sign-ins for this account.");
    const user = await findUserByEmail(db, email);
    const ok = await verifyPassword(user?.passwordHash ?? null, password);
    if (!user || !ok) {
      const [failures] = await Promise.all([
        countFailure(limiters.signInAccount, acct),
        countFailure(limiters.signInAddress, ip),
      ]);
      if (failures === LIMITS.signInAccount.points) {
        const lockMinutes = LIMITS.signInAccount.duration / 60;
        inBackground("sign-in lock e-mail", () => sendSignInLockedAlert(opts.mail, acct, { failures, lockMinutes }));
      }
      throw new AppError(401, "bad_credentials", "That e-mail and password do not match an account.");
    }
    await limiters.signInAccount.delete(acct);
    const session = await lucia.createSession(user.id, {});
    await recordAudit(db, {
      siteId: null,
      entityType: "user",
      entityId: user.id,
      action: "signed_in",
      actorId: user.id,
    });
    setCookie(res, lucia.createSessionCookie(session.id));
    res.json({ user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin } });
  });

  r.post("/auth/sign-out", async (_req, res) => {
    if (res.locals.session) await lucia.invalidateSession(res.locals.session.id);
    setCookie(res, lucia.createBlankSessionCookie());
    res.json({ ok: true });
  });

  /**
   * Change one's own password while signed in: the current password is required and counts against
   * the account's sign-in allowance when wrong; every session ends and this browser gets a new one.
   */
  r.post("/account/password", requireUser, async (req, res) => {
    const body = changePasswordBody.parse(req.body);
    const user = res.locals.user!;
    const acct = accountKey(user.email);
    await refuseIfSpent(limiters.signInAccount, acct, "Too many wrong passwords for this account.");
    await changePassword(opts.mail, user.id, body, async (ok) => {
      if (!ok) await countFailure(limiters.signInAccount, acct);
    });
    await lucia.invalidateUserSessions(user.id);
    const session = await lucia.createSession(user.id, {});
    setCookie(res, lucia.createSessionCookie(session.id));
    res.json({ ok: true });
  });

  r.get("/session", requireUser, async (_req, res) => {
    const user = res.locals.user!;
    const memberships = await listMemberships(db, user.id);
    res.json({ user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin }, memberships });
  });

  return r;
}
