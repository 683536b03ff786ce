import type { RequestHandler, Response } from "express";
import type { Cookie } from "lucia";
import type { AppLucia } from "../auth/lucia";

/** Sets a lucia cookie, Secure exactly when the request came over https. */
export function setCookie(res: Response, cookie: Cookie) {
  cookie.attributes.secure = res.req.secure;
  res.append("Set-Cookie", cookie.serialize());
}

/** Reads the session cookie on every request; res.locals.user is null when signed out. */
export function sessionMiddleware(lucia: AppLucia): RequestHandler {
  return async (req, res, next) => {
    res.locals.user = null;
    res.locals.session = null;
    const sessionId = lucia.readSessionCookie(req.headers.cookie ?? "");
    if (!sessionId) return next();
    const { session, user } = await lucia.validateSession(sessionId);
    if (session?.fresh) setCookie(res, lucia.createSessionCookie(session.id));
    if (!session) setCookie(res, lucia.createBlankSessionCookie());
    res.locals.user = user;
    res.locals.session = session;
    next();
  };
}
