import type { RequestHandler } from "express";
import { z } from "zod";
import { can, type Action } from "../../src/domain/permissions";
import type { Db } from "../db";
import { AppError, forbidden } from "../errors";
import { standingOn } from "../sites/reads";

export const unauthenticated = () => new AppError(401, "unauthenticated", "Please sign in.");

export const requireUser: RequestHandler = (_req, res, next) => {
  if (!res.locals.user) return next(unauthenticated());
  next();
};

export const requireAdmin: RequestHandler = (_req, res, next) => {
  if (!res.locals.user) return next(unauthenticated());
  if (!res.locals.user.isAdmin) return next(forbidden("Only an instance admin can do that."));
  next();
};

const siteParam = z.object({ siteId: z.uuid({ message: "siteId must be a UUID" }) });

/**
 * The caller must be a member of the site named by :siteId whose role may do `action` in the
 * permission table (src/domain/permissions.ts; "site.read" is every member); every guarded route
 * names its action, never a role. An instance admin counts as every role on any site that exists.
 * Non-members get 404, so site ids of other crews are not confirmed to exist. The caller's standing
 * comes from the sites domain (server/sites/reads.ts).
 */
export function requireSiteRole(db: Db, action: Action): RequestHandler {
  return async (req, res, next) => {
    const user = res.locals.user;
    if (!user) return next(unauthenticated());
    const { siteId } = siteParam.parse(req.params);
    const role = await standingOn(db, siteId, user);
    if (!role) return next(new AppError(404, "not_found", "That site was not found."));
    if (!can(role, action)) return next(forbidden());
    res.locals.siteRole = role;
    next();
  };
}
