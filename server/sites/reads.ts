import { localDate } from "../../src/domain/local-time";
import type { SiteRole } from "../../src/domain/permissions";
import type { Role } from "../../src/domain/vocab";
import type { Db } from "../db";
import * as repo from "./repository";

/** The reads of the sites domain: what the routes and the role guard ask of sites and memberships. */

/** The sites a person sees with their role on each; an instance admin sees every site ("admin" where not a member). */
export async function sitesFor(db: Db, user: { id: string; isAdmin: boolean }) {
  const mine = await repo.listSitesForUser(db, user.id);
  if (!user.isAdmin) return mine;
  const roles = new Map(mine.map((s) => [s.id, s.role]));
  const all = await repo.listAllSites(db);
  return all.map((s) => ({ ...s, role: roles.get(s.id) ?? ("admin" as const) }));
}

export const findSite = (db: Db, siteId: string) => repo.findSite(db, siteId);

/** The site's IANA time zone, its clock for files, the report, e-mails and its days ("UTC" when the site is gone). */
export async function siteTimeZone(db: Db, siteId: string): Promise<string> {
  return (await repo.findSite(db, siteId))?.timeZone ?? "UTC";
}

/**
 * The site's calendar day at `at` (now by default), in its own time zone: the day a qualification's expiry, "overdue"
 * and a file's date are counted in, so a crew east or west of Greenwich is not a day early or late around midnight.
 */
export async function siteToday(db: Db, siteId: string, at: Date = new Date()): Promise<string> {
  return localDate(at, await siteTimeZone(db, siteId));
}

/**
 * The clock to write a person's own account messages in (a password change): the time zone of their sites when they
 * all keep one, else UTC (an account is not a site's; a yard's person on sites in two zones gets UTC, named).
 */
export async function accountTimeZone(db: Db, userId: string): Promise<string> {
  const zones = await repo.timeZonesOfUser(db, userId);
  return zones.length === 1 ? zones[0] : "UTC";
}

/** The site's name; throws when the site is gone. */
export const siteName = (db: Db, siteId: string) => repo.siteName(db, siteId);

/** A person's memberships (site id and name, role), by site name: the session's answer and whose e-mails they get. */
export const membershipsOf = (db: Db, userId: string) => repo.listMembershipsOfUser(db, userId);

export const listMembers = (db: Db, siteId: string) => repo.listMembers(db, siteId);

/**
 * The accounts given (the auth domain's list, which the route reads) each with the sites it is a member of and the
 * role there: the instance admin's list. One statement, whatever the number of accounts.
 */
export async function withTheirSites(
  db: Db,
  accounts: Array<{
    id: string;
    email: string;
    name: string;
    isAdmin: boolean;
    createdAt: Date;
    suspendedAt: Date | null;
    suspendedReason: string;
    suspendedByName: string | null;
  }>,
) {
  const memberships = await repo.listAllMemberships(db);
  const byAccount = new Map<string, typeof memberships>();
  for (const m of memberships) {
    const theirs = byAccount.get(m.userId);
    if (theirs) theirs.push(m);
    else byAccount.set(m.userId, [m]);
  }
  return accounts.map((a) => ({
    id: a.id,
    email: a.email,
    name: a.name,
    isAdmin: a.isAdmin,
    createdAt: a.createdAt.toISOString(),
    suspended: a.suspendedAt
      ? { at: a.suspendedAt.toISOString(), byName: a.suspendedByName, reason: a.suspendedReason }
      : null,
    sites: (byAccount.get(a.id) ?? []).map(({ siteId, siteName, role }) => ({ siteId, siteName, role })),
  }));
}

/**
 * Each site's role of the person whose `users` row the outer statement reads, as one subquery: the
 * sessions' read carries it (server/auth/session-repository.ts), so it is read in the same statement,
 * at the same moment, as the session itself.
 */
export const memberRolesOf = repo.memberRolesOf;

/**
 * A person's standing on a site, as the route guard needs it: their member role, "admin" for an
 * instance admin (on any site that exists), or null when the site is unknown to them. A member's role
 * comes from `siteRoles`, read with this request's session (`memberRolesOf`), so it costs no statement; an
 * instance admin's asks whether the site exists.
 */
export async function standingOn(
  db: Db,
  siteId: string,
  user: { isAdmin: boolean; siteRoles: Readonly<Record<string, Role>> },
): Promise<SiteRole | null> {
  if (user.isAdmin) return (await repo.findSite(db, siteId)) ? "admin" : null;
  return Object.hasOwn(user.siteRoles, siteId) ? user.siteRoles[siteId] : null;
}
