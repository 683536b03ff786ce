import type { Role } from "../../src/domain/vocab";
import { recordAudit } from "../audit";
import { accountByEmail, addAccount } from "../auth/service";
import { hashPassword } from "../auth/password";
import type { Db } from "../db";
import { AppError, conflict, notFound } from "../errors";
import * as repo from "./repository";

/**
 * The one writer of memberships. Every change locks the site's row first, then checks the
 * rule that a site keeps at least one curator (so nobody locks the crew out of its own
 * board), then writes and audits, all in the caller's transaction. Nobody is added to a
 * site except through an invitation they accept (server/invitations/accept.ts).
 */
const lastCurator = () => conflict("A site needs at least one curator. Make someone else curator first.");

async function lockedMember(trx: Db, siteId: string, userId: string) {
  if (!(await repo.lockSite(trx, siteId))) throw notFound("That site");
  return repo.findMembership(trx, siteId, userId);
}

/** Adds a membership as an invitation is accepted; someone already on the crew keeps their role. */
export async function joinByInvitation(trx: Db, siteId: string, userId: string, role: Role, invitationId: string) {
  if (await lockedMember(trx, siteId, userId)) return false;
  await repo.insertMembership(trx, siteId, userId, role);
  await recordAudit(trx, {
    siteId,
    entityType: "membership",
    entityId: userId,
    action: "add",
    actorId: userId,
    after: { role, invitationId },
  });
  return true;
}

export async function changeRole(db: Db, siteId: string, userId: string, role: Role, actorId: string) {
  await db.transaction().execute(async (trx) => {
    const m = await lockedMember(trx, siteId, userId);
    if (!m) throw notFound("That member");
    if (m.role === role) return;
    if (m.role === "curator" && (await repo.countCurators(trx, siteId)) <= 1) throw lastCurator();
    await repo.updateMembershipRole(trx, siteId, userId, role);
    await recordAudit(trx, {
      siteId,
      entityType: "membership",
      entityId: userId,
      action: "change",
      actorId,
      before: { role: m.role },
      after: { role },
    });
  });
}

export async function removeMember(db: Db, siteId: string, userId: string, actorId: string) {
  await db.transaction().execute(async (trx) => {
    const m = await lockedMember(trx, siteId, userId);
    if (!m) throw notFound("That member");
    if (m.role === "curator" && (await repo.countCurators(trx, siteId)) <= 1) throw lastCurator();
    await repo.deleteMembership(trx, siteId, userId);
    await recordAudit(trx, {
      siteId,
      entityType: "membership",
      entityId: userId,
      action: "remove",
      actorId,
      before: { role: m.role },
    });
  });
}

export async function createSite(
  db: Db,
  s: { name: string; kind: "vessel" | "building" | "plant"; location: string; description: string; timeZone?: string },
  actorId: string,
) {
  return db.transaction().execute(async (trx) => {
    const site = await repo.insertSite(trx, s);
    await recordAudit(trx, {
      siteId: site.id,
      entityType: "site",
      entityId: site.id,
      action: "create",
      actorId,
      after: s,
    });
    return site;
  });
}

export async function createUser(
  db: Db,
  u: { email: string; name: string; password: string; isAdmin: boolean },
  actorId: string | null,
) {
  if (await accountByEmail(db, u.email))
    throw new AppError(409, "email_taken", "An account with that e-mail already exists.", { email: "Already in use" });
  const passwordHash = await hashPassword(u.password);
  return db.transaction().execute(async (trx) => {
    const user = await addAccount(trx, { email: u.email, name: u.name, passwordHash, isAdmin: u.isAdmin });
    await recordAudit(trx, {
      siteId: null,
      entityType: "user",
      entityId: user.id,
      action: "create",
      actorId,
      after: { email: u.email, name: u.name, isAdmin: u.isAdmin },
    });
    return user;
  });
}

/** The curator sets the site's time zone (exports write local times in it); audited. */
export async function setTimeZone(db: Db, siteId: string, timeZone: string, actorId: string) {
  return db.transaction().execute(async (trx) => {
    const before = await repo.findSiteForUpdate(trx, siteId);
    if (!before) throw notFound("That site");
    const site = (await repo.setTimeZone(trx, siteId, timeZone))!;
    if (before.timeZone !== timeZone)
      await recordAudit(trx, {
        siteId,
        entityType: "site",
        entityId: siteId,
        action: "update",
        actorId,
        before: { timeZone: before.timeZone },
        after: { timeZone },
      });
    return site;
  });
}

/**
 * The curator sets the site's currency (every cost is shown and entered in it); audited. Amounts are
 * not converted: they were entered as numbers and now read in the new code. `from` guards a
 * concurrent change: 409 with the current site when it no longer matches.
 */
export async function setCurrency(db: Db, siteId: string, currency: string, from: string | undefined, actorId: string) {
  return db.transaction().execute(async (trx) => {
    const before = await repo.findSiteForUpdate(trx, siteId);
    if (!before) throw notFound("That site");
    if (from !== undefined && from !== before.currency)
      throw new AppError(
        409,
        "currency_changed",
        `Someone set the currency to ${before.currency} meanwhile.`,
        undefined,
        (await repo.findSite(trx, siteId))!,
      );
    if (before.currency === currency) return (await repo.findSite(trx, siteId))!;
    const site = (await repo.setCurrency(trx, siteId, currency))!;
    await recordAudit(trx, {
      siteId,
      entityType: "site",
      entityId: siteId,
      action: "update",
      actorId,
      before: { currency: before.currency },
      after: { currency },
    });
    return site;
  });
}
