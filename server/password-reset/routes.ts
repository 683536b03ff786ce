import { Router } from "express";
import { z } from "zod";
import { RESET_REQUEST_MESSAGE, resetPasswordBody, resetRequestBody } from "../../src/schemas/account";
import type { AppLucia } from "../auth/lucia";
import { accountKey, hit, type Limiters } from "../auth/throttle";
import { inBackground } from "../mail/background";
import type { MailDeps } from "../mail/mailer";
import { setCookie } from "../middleware/session";
import { completeReset, previewReset, sendResetLink } from "./service";

const tokenParams = z.object({
  token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, { message: "That is not a reset link" }),
});

export function passwordResetRoutes(deps: MailDeps, lucia: AppLucia, limiters: Limiters) {
  const r = Router();

  // The same answer, at once, for every address: the lookup and the e-mail happen after it.
  r.post("/auth/password-reset", async (req, res) => {
    const { email } = resetRequestBody.parse(req.body);
    // Counted per typed address whether or not an account uses it, so a 429 reveals nothing.
    await hit(limiters.resetAddress, req.ip ?? "unknown", "Too many password-reset requests from this network.");
    await hit(limiters.resetEmail, accountKey(email), "Too many password-reset requests for this address.");
    inBackground("password reset e-mail", () => sendResetLink(deps, email));
    res.status(202).json({ ok: true, message: RESET_REQUEST_MESSAGE });
  });

  r.get("/auth/password-reset/:token", async (req, res) => {
    const { token } = tokenParams.parse(req.params);
    res.json(await previewReset(deps.db, token));
  });

  // Every session of the user ends (a stolen one included); this browser gets a new one.
  r.post("/auth/password-reset/:token", async (req, res) => {
    const { token } = tokenParams.parse(req.params);
    const { password } = resetPasswordBody.parse(req.body);
    const { userId } = await completeReset(deps.db, token, password);
    await lucia.invalidateUserSessions(userId);
    const session = await lucia.createSession(userId, {});
    setCookie(res, lucia.createSessionCookie(session.id));
    res.json({ ok: true });
  });

  return r;
}
