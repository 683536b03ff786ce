import { Router } from "express";
import { z } from "zod";
import {
  changeRoleBody,
  createSiteBody,
  createUserBody,
  siteCurrencyBody,
  suspendAccountBody,
  instanceAdminBody,
  siteTimeZoneBody,
} from "../../src/schemas/sites";
import { allAccounts } from "../auth/service";
import { reinstateAccount, suspendAccount } from "../auth/suspension";
import { setAdmin } from "../auth/instance-admins";
import type { Db } from "../db";
import { notFound } from "../errors";
import { requireAdmin, requireSiteRole, requireUser } from "../middleware/roles";
import * as reads from "./reads";
import * as service from "./service";

const memberParams = z.object({ siteId: z.uuid(), userId: z.uuid() });
const accountParams = z.object({ userId: z.uuid({ message: "userId must be a UUID" }) });

export function siteRoutes(db: Db) {
  const r = Router();

  r.get("/sites", requireUser, async (_req, res) => {
    res.json({ sites: await reads.sitesFor(db, res.locals.user!) });
  });

  r.post("/sites", requireAdmin, async (req, res) => {
    const site = await service.createSite(db, createSiteBody.parse(req.body), res.locals.user!.id);
    res.status(201).json({ site: { ...site, role: "admin" } });
  });

  r.get("/sites/:siteId", requireSiteRole(db, "site.read"), async (req, res) => {
    const site = await reads.findSite(db, req.params.siteId as string);
    if (!site) throw notFound("That site");
    res.json({ site: { ...site, role: res.locals.siteRole } });
  });

  r.put("/sites/:siteId/time-zone", requireSiteRole(db, "site.settings"), async (req, res) => {
    const { siteId } = z.object({ siteId: z.uuid() }).parse(req.params);
    const { timeZone } = siteTimeZoneBody.parse(req.body);
    const site = await service.setTimeZone(db, siteId, timeZone, res.locals.user!.id);
    res.json({ site: { ...site, role: res.locals.siteRole } });
  });

  r.put("/sites/:siteId/currency", requireSiteRole(db, "site.settings"), async (req, res) => {
    const { siteId } = z.object({ siteId: z.uuid() }).parse(req.params);
    const { currency, from } = siteCurrencyBody.parse(req.body);
    const site = await service.setCurrency(db, siteId, currency, from, res.locals.user!.id);
    res.json({ site: { ...site, role: res.locals.siteRole } });
  });

  r.get("/sites/:siteId/members", requireSiteRole(db, "members.manage"), async (req, res) => {
    res.json({ members: await reads.listMembers(db, req.params.siteId as string) });
  });

  // No "add a member" here: people join a site only by accepting an invitation (/invitations).

  r.patch("/sites/:siteId/members/:userId", requireSiteRole(db, "members.manage"), async (req, res) => {
    const { siteId, userId } = memberParams.parse(req.params);
    await service.changeRole(db, siteId, userId, changeRoleBody.parse(req.body).role, res.locals.user!.id);
    res.json({ members: await reads.listMembers(db, siteId) });
  });

  r.delete("/sites/:siteId/members/:userId", requireSiteRole(db, "members.manage"), async (req, res) => {
    const { siteId, userId } = memberParams.parse(req.params);
    await service.removeMember(db, siteId, userId, res.locals.user!.id);
    res.json({ members: await reads.listMembers(db, siteId) });
  });

  // The instance's accounts with their sites and roles, for its admins (who create accounts and may help any crew).
  r.get("/admin/users", requireAdmin, async (_req, res) => {
    res.json({ users: await reads.withTheirSites(db, await allAccounts(db)) });
  });

  r.post("/admin/users", requireAdmin, async (req, res) => {
    const user = await service.createUser(db, createUserBody.parse(req.body), res.locals.user!.id);
    res.status(201).json({ user });
  });

  // Suspending an account and reinstating it (server/auth/suspension.ts); the answer is the list as it now stands.
  r.post("/admin/users/:userId/suspension", requireAdmin, async (req, res) => {
    const { userId } = accountParams.parse(req.params);
    const { reason } = suspendAccountBody.parse(req.body);
    await suspendAccount(db, res.locals.user!.id, userId, reason);
    res.json({ users: await reads.withTheirSites(db, await allAccounts(db)) });
  });

  r.delete("/admin/users/:userId/suspension", requireAdmin, async (req, res) => {
    const { userId } = accountParams.parse(req.params);
    await reinstateAccount(db, res.locals.user!.id, userId);
    res.json({ users: await reads.withTheirSites(db, await allAccounts(db)) });
  });

  // Making an account an instance admin, or no longer one (server/auth/instance-admins.ts).
  r.put("/admin/users/:userId/instance-admin", requireAdmin, async (req, res) => {
    const { userId } = accountParams.parse(req.params);
    const { isAdmin } = instanceAdminBody.parse(req.body);
    await setAdmin(db, res.locals.user!.id, userId, isAdmin);
    res.json({ users: await reads.withTheirSites(db, await allAccounts(db)) });
  });

  return r;
}
