import type { RequestHandler } from "express";
import { z } from "zod";
import { can, isAction, type Action } from "../../src/domain/permissions";
import type { Role } from "../../src/domain/vocab";
import type { Db } from "../db";
import { AppError, forbidden } from "../errors";

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
 * permission table (src/domain/permissions.ts); without an action, any member passes (an instance
 * admin counts as every role). Non-members get 404, so site ids of other crews are not confirmed
 * to exist. A list of roles is still accepted for branches written before the table; name an
 * action instead.
 */
export function requireSiteRole(db: Db, ...allowed: [] | [Action] | Role[]): RequestHandler {
  const [first] = allowed;
  const permits = (role: Role) =>
    first === undefined ? true : isAction(first) ? can(role, first) : (allowed as Role[]).includes(role);
  return async (req, res, next) => {
    const user = res.locals.user;
    if (!user) return next(unauthenticated());
    const { siteId } = siteParam.parse(req.params);
    const m = await db
      .selectFrom("memberships")
      .select("role")
      .where("siteId", "=", siteId)
      .where("userId", "=", user.id)
      .executeTakeFirst();
    if (user.isAdmin) {
      const site = await db.selectFrom("sites").select("id").where("id", "=", siteId).executeTakeFirst();
      if (!site) return next(new AppError(404, "not_found", "That site was not found."));
      res.locals.siteRole = "admin";
      return next();
    }
    if (!m) return next(new AppError(404, "not_found", "That site was not found."));
    if (!permits(m.role)) return next(forbidden());
    res.locals.siteRole = m.role;
    next();
  };
}
