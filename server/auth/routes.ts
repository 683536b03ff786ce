import { Router } from "express";
import { signInBody } from "../../src/schemas/auth";
import type { Db } from "../db";
import { AppError } from "../errors";
import { requireUser } from "../middleware/roles";
import { setCookie } from "../middleware/session";
import type { AppLucia } from "./lucia";
import { verifyPassword } from "./password";
import { findUserByEmail, listMemberships } from "./repository";

export function authRoutes(db: Db, lucia: AppLucia) {
  const r = Router();

  r.post("/auth/sign-in", async (req, res) => {
    const { email, password } = signInBody.parse(req.body);
    const user = await findUserByEmail(db, email);
    const ok = await verifyPassword(user?.passwordHash ?? null, password);
    if (!user || !ok) throw new AppError(401, "bad_credentials", "That e-mail and password do not match an account.");
    const session = await lucia.createSession(user.id, {});
    setCookie(res, lucia.createSessionCookie(session.id));
    res.json({ user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin } });
  });

  r.post("/auth/sign-out", async (_req, res) => {
    if (res.locals.session) await lucia.invalidateSession(res.locals.session.id);
    setCookie(res, lucia.createBlankSessionCookie());
    res.json({ ok: true });
  });

  r.get("/session", requireUser, async (_req, res) => {
    const user = res.locals.user!;
    const memberships = await listMemberships(db, user.id);
    res.json({ user: { id: user.id, email: user.email, name: user.name, isAdmin: user.isAdmin }, memberships });
  });

  return r;
}
