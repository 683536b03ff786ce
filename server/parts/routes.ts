import { pipeline } from "node:stream/promises";
import type { Readable } from "node:stream";
import { Router, type Response } from "express";
import { z } from "zod";
import {
  createLineBody,
  heritageRuleBody,
  leadBody,
  lineLinksQuery,
  listQuery,
  shareLinkBody,
  statusBody,
  updateLeadBody,
  updateLineBody,
} from "../../src/schemas/parts";
import type { Db } from "../db";
import type { PhotoStorage } from "../photos/storage";
import type { MailDeps } from "../mail/mailer";
import { sendDefectNotices } from "../defects/notices";
import type { Role } from "../../src/domain/vocab";
import { AppError } from "../errors";
import { requireSiteRole } from "../middleware/roles";
import { limitExports, runExport } from "../export-stream";
import { siteTimeZone } from "../sites/reads";
import { localDate } from "../../src/domain/local-time";
import { nameplateThumb } from "../photos/reads";
import * as service from "./service";
import { moveLineStatus } from "./workflow";
import * as share from "./share";

const lineParams = z.object({ siteId: z.uuid(), lineId: z.uuid({ message: "lineId must be a UUID" }) });
const leadParams = z.object({ siteId: z.uuid(), leadId: z.uuid({ message: "leadId must be a UUID" }) });
const linkParams = z.object({ siteId: z.uuid(), linkId: z.uuid({ message: "linkId must be a UUID" }) });
const photoParams = z.object({ siteId: z.uuid(), photoId: z.uuid() });
const tokenParams = z.object({ token: z.string().regex(/^[A-Za-z0-9_-]{43}$/) });
const actor = (res: Response) => res.locals.user!.id;

async function sendPhoto(res: Response, photo: Readable | null) {
  if (!photo) throw new AppError(404, "not_found", "No nameplate photo is stored for that.");
  res.setHeader("Cache-Control", "private, max-age=300");
  res.setHeader("X-Content-Type-Options", "nosniff");
  res.type("image/jpeg"); // thumbnails are always JPEG renditions (server/photos)
  await pipeline(photo, res);
}

/** The wanted list: members read; scrounger and curator edit; curator sets heritage rules and revokes shares. */
export function partsRoutes(db: Db, storage: PhotoStorage, mail?: MailDeps) {
  const r = Router();
  const base = "/sites/:siteId/parts";

  r.get(base, requireSiteRole(db, "site.read"), async (req, res) => {
    res.json(await service.listParts(db, req.params.siteId as string, listQuery.parse(req.query)));
  });

  r.get("/sites/:siteId/parts.csv", requireSiteRole(db, "site.read"), limitExports(db), async (req, res) => {
    // Read 500 lines at a time into memory (a site has hundreds to a few thousand lines; the
    // connection is back in the pool before the first byte goes out), then written with the
    // export's back-pressure and write timeout.
    const { page: _p, size: _s, ...filter } = listQuery.parse(req.query);
    const zone = await siteTimeZone(db, req.params.siteId as string);
    res.setHeader("Content-Type", "text/csv; charset=utf-8");
    res.setHeader("Content-Disposition", `attachment; filename="wanted-parts-${localDate(new Date(), zone)}.csv"`);
    await runExport(res, (out) => service.writePartsCsv(db, req.params.siteId as string, filter, zone, out));
  });

  r.post(base, requireSiteRole(db, "parts.edit"), async (req, res) => {
    const siteId = req.params.siteId as string;
    const id = await service.createManualLine(db, siteId, createLineBody.parse(req.body), {
      id: actor(res),
      role: res.locals.siteRole!,
    });
    res.status(201).json({ line: await service.lineRow(db, siteId, id) });
  });

  r.get(`${base}/share-links`, requireSiteRole(db, "parts.edit"), async (req, res) => {
    res.json({ links: await share.listShareLinks(db, req.params.siteId as string) });
  });
  r.post(`${base}/share-links`, requireSiteRole(db, "parts.edit"), async (req, res) => {
    const { token, link } = await share.createShareLink(
      db,
      req.params.siteId as string,
      shareLinkBody.parse(req.body).label,
      actor(res),
    );
    res.status(201).json({ link, token, url: `/share/parts/${token}` });
  });
  r.delete(`${base}/share-links/:linkId`, requireSiteRole(db, "parts.revoke_share"), async (req, res) => {
    const { siteId, linkId } = linkParams.parse(req.params);
    await share.revokeShareLink(db, siteId, linkId, actor(res));
    res.json({ links: await share.listShareLinks(db, siteId) });
  });

  r.get(`${base}/photos/:photoId/thumb`, requireSiteRole(db, "site.read"), async (req, res) => {
    const { siteId, photoId } = photoParams.parse(req.params);
    await sendPhoto(res, await nameplateThumb(db, storage, siteId, photoId));
  });

  r.patch(`${base}/leads/:leadId`, requireSiteRole(db, "parts.edit"), async (req, res) => {
    const { siteId, leadId } = leadParams.parse(req.params);
    await service.updateLead(db, siteId, leadId, updateLeadBody.parse(req.body), actor(res));
    res.json({ ok: true });
  });

  r.get(`${base}/:lineId`, requireSiteRole(db, "site.read"), async (req, res) => {
    const { siteId, lineId } = lineParams.parse(req.params);
    res.json(await service.lineDetail(db, siteId, lineId));
  });
  r.get(`${base}/:lineId/links`, requireSiteRole(db, "site.read"), async (req, res) => {
    const { siteId, lineId } = lineParams.parse(req.params);
    res.json(await service.lineLinks(db, siteId, lineId, lineLinksQuery.parse(req.query)));
  });
  r.patch(`${base}/:lineId`, requireSiteRole(db, "parts.edit"), async (req, res) => {
    const { siteId, lineId } = lineParams.parse(req.params);
    res.json({ line: await service.updateLine(db, siteId, lineId, updateLineBody.parse(req.body), actor(res)) });
  });
  r.put(`${base}/:lineId/heritage-rule`, requireSiteRole(db, "parts.heritage_rule"), async (req, res) => {
    const { siteId, lineId } = lineParams.parse(req.params);
    res.json({ line: await service.setHeritageRule(db, siteId, lineId, heritageRuleBody.parse(req.body), actor(res)) });
  });
  r.post(`${base}/:lineId/status`, requireSiteRole(db, "parts.edit"), async (req, res) => {
    const { siteId, lineId } = lineParams.parse(req.params);
    const who = { id: actor(res), role: res.locals.siteRole as Role | "admin" };
    const { line, ctx } = await moveLineStatus(db, siteId, lineId, statusBody.parse(req.body), who);
    res.json({ line });
    sendDefectNotices(mail, ctx); // a fitted part may have moved a defect on: its notice goes after the commit
  });
  r.post(`${base}/:lineId/leads`, requireSiteRole(db, "parts.edit"), async (req, res) => {
    const { siteId, lineId } = lineParams.parse(req.params);
    const lead = await service.addLead(db, siteId, lineId, leadBody.parse(req.body), actor(res));
    res.status(201).json({ lead: { ...lead, createdAt: lead.createdAt.toISOString() } });
  });

  // Public, read-only, no sign-in: the token is the only key.
  r.get("/share/parts/:token", async (req, res) => {
    const parsed = tokenParams.safeParse(req.params);
    if (!parsed.success) throw new AppError(404, "not_found", "This share link does not exist.");
    res.json(await share.sharedList(db, parsed.data.token));
  });
  r.get("/share/parts/:token/photos/:photoId", async (req, res) => {
    const parsed = tokenParams.extend({ photoId: z.uuid() }).safeParse(req.params);
    if (!parsed.success) throw new AppError(404, "not_found", "No such photo.");
    const siteId = await share.siteOfToken(db, parsed.data.token);
    if (!(await share.photoIsShared(db, parsed.data.token, parsed.data.photoId)))
      throw new AppError(404, "not_found", "No such photo.");
    await sendPhoto(res, await nameplateThumb(db, storage, siteId, parsed.data.photoId));
  });

  return r;
}
