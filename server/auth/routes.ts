import { Router } from "express";
import { signInBody } from "../../src/schemas/auth";
import { changePasswordBody } from "../../src/schemas/account";
import { changePassword } from "./password-change";
import type { Db } from "../db";
import type { MailDeps } from "../mail/mailer";
import { requireUser } from "../middleware/roles";
import { setCookie } from "../middleware/session";
import { accountTimeZone, membershipsOf } from "../sites/reads";
import type { AppLucia } from "./lucia";
import { signIn } from "./service";
import { signedInPlaces, signOutElsewhere } from "./other-sessions";
import { accountKey, countFailure, refuseIfSpent, type Limiters } from "./throttle";

export function authRoutes(db: Db, lucia: AppLucia, opts: { mail: MailDeps; limiters: Limiters }) {
  const r = Router();
  const { limiters } = opts;

  /** Throttled per account and per address (see signIn); the owner hears once per lock, by e-mail. */
  r.post("/auth/sign-in", async (req, res) => {
    const { email, password } = signInBody.parse(req.body);
    const { session, user } = await signIn(db, { lucia, ...opts }, { email, password, ip: req.ip ?? "unknown" });
    setCookie(res, lucia.createSessionCookie(session.id));
    res.json({ user });
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
    await changePassword(
      opts.mail,
      user.id,
      body,
      async (ok) => {
        if (!ok) await countFailure(limiters.signInAccount, acct);
      },
      await accountTimeZone(db, user.id),
    );
    await lucia.invalidateUserSessions(user.id);
    const session = await lucia.createSession(user.id, {});
    setCookie(res, lucia.createSessionCookie(session.id));
    res.json({ ok: true });
  });

  /** In how many places this account is signed in (this one included), and signing out of all but this one. */
  r.get("/account/sessions", requireUser, async (_req, res) => {
    res.json({ places: await signedInPlaces(db, res.locals.user!.id) });
  });
  r.post("/account/sessions/sign-out-others", requireUser, async (_req, res) => {
    const ended = await signOutElsewhere(db, res.locals.user!.id, res.locals.session!.id);
    res.json({ ended, places: await signedInPlaces(db, res.locals.user!.id) });
  });

  r.get("/session", requireUser, async (_req, res) => {
    const user = res.locals.user!;
    const memberships = await membershipsOf(db, user.id);
    res.json({ user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin }, memberships });
  });

  return r;
}
