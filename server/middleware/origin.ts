import type { RequestHandler } from "express";
import { verifyRequestOrigin } from "lucia";
import { AppError } from "../errors";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * lucia's CSRF advice: a state-changing request must carry an Origin header naming
 * this host. Public share links are read-only (GET), so nothing is exempt.
 */
export function originCheck(extraOrigins: string[] = []): RequestHandler {
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    const origin = req.headers.origin;
    const host = req.headers.host;
    if (!origin || !host || !verifyRequestOrigin(origin, [host, ...extraOrigins])) {
      return next(new AppError(403, "bad_origin", "This request did not come from Tideline's own pages."));
    }
    next();
  };
}
