import { Router, type Request, type Response } from "express";
import { z } from "zod";
import { localDate } from "../../src/domain/local-time";
import type { Role } from "../../src/domain/vocab";
import {
  assignBody,
  bulkBody,
  createDefectBody,
  linkReadingBody,
  listQuery,
  patchDefectBody,
  pinBody,
  transitionBody,
  unpinBody,
  viewBody,
} from "../../src/schemas/defects";
import type { Db } from "../db";
import type { MailDeps } from "../mail/mailer";
import { sendDefectNotices as sendNotices } from "./notices";
import { limitExports } from "../export-stream";
import { idempotent } from "../idempotency/middleware";
import { requireSiteRole } from "../middleware/roles";
import { streamCsv } from "./csv";
import { registerPage } from "./reads";
import { pin, unpin } from "./pins";
import { boardRepairPlan, detail, findingContext, formOptions, positionsOf, repairPlan, toJson } from "./reads";
import { defectsOfBoardReadings, evidenceOf } from "./evidence";
import * as service from "./service";
import * as views from "./views";
import { siteTimeZone, siteToday } from "../sites/reads";

const site = z.object({ siteId: z.uuid() });
const one = site.extend({ defectId: z.uuid({ message: "defectId must be a UUID" }) });
const viewParams = site.extend({ viewId: z.uuid() });
const boardParams = site.extend({ boardId: z.uuid() });

const ctxOf = (req: Request, res: Response): service.Ctx => ({
  siteId: site.parse(req.params).siteId,
  actor: { id: res.locals.user!.id, role: res.locals.siteRole as Role | "admin" },
  notices: [],
});
/** The client's calendar day (for "overdue"), else the site's own (read only when the client sent none). */
const todayOf = async (db: Db, siteId: string, q: { today?: string }) => q.today ?? (await siteToday(db, siteId));

export function defectRoutes(db: Db, mail?: MailDeps) {
  const r = Router();
  const base = "/sites/:siteId/defects";
  const member = requireSiteRole(db, "site.read");
  const raisers = requireSiteRole(db, "defects.raise");
  const curator = requireSiteRole(db, "defects.manage");

  r.get(base, member, async (req, res) => {
    const f = listQuery.parse(req.query);
    const { siteId } = ctxOf(req, res);
    const { rows, total } = await registerPage(db, siteId, f, await todayOf(db, siteId, f));
    res.json({ rows: rows.map(toJson), total, page: f.page, size: f.size });
  });

  r.get(`${base}.csv`, member, limitExports(db), async (req, res) => {
    const f = listQuery.parse(req.query);
    const { siteId } = ctxOf(req, res);
    const zone = await siteTimeZone(db, siteId);
    const today = f.today ?? localDate(new Date(), zone);
    await streamCsv(db, siteId, zone, f, today, res, `defects-${today}.csv`);
  });

  r.get(`${base}/options`, member, async (req, res) => {
    const { siteId } = ctxOf(req, res);
    res.json(await formOptions(db, siteId));
  });

  r.get("/sites/:siteId/defect-positions/:boardId", member, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({ positions: await positionsOf(db, siteId, boardId) });
  });

  r.get("/sites/:siteId/defect-context", member, async (req, res) => {
    const q = z
      .object({ positionId: z.uuid().optional(), componentId: z.uuid().optional(), inspectionId: z.uuid().optional() })
      .parse(req.query);
    res.json({ context: await findingContext(db, ctxOf(req, res).siteId, q) });
  });

  r.get("/sites/:siteId/repair-plan", member, async (req, res) => {
    res.json(await repairPlan(db, ctxOf(req, res).siteId));
  });

  r.get("/sites/:siteId/repair-plan/boards/:boardId", member, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json(await boardRepairPlan(db, siteId, boardId));
  });

  r.get(`${base}/views`, member, async (req, res) => {
    res.json({ views: await views.listViews(db, ctxOf(req, res).siteId, res.locals.user!.id) });
  });
  r.post(`${base}/views`, member, async (req, res) => {
    res
      .status(201)
      .json({ view: await views.saveView(db, ctxOf(req, res).siteId, res.locals.user!.id, viewBody.parse(req.body)) });
  });
  r.put(`${base}/views/:viewId`, member, async (req, res) => {
    const { siteId, viewId } = viewParams.parse(req.params);
    res.json({ view: await views.updateView(db, siteId, res.locals.user!.id, viewId, viewBody.parse(req.body)) });
  });
  r.delete(`${base}/views/:viewId`, member, async (req, res) => {
    const { siteId, viewId } = viewParams.parse(req.params);
    await views.deleteView(db, siteId, res.locals.user!.id, viewId);
    res.status(204).end();
  });

  r.post(`${base}/bulk`, curator, async (req, res) => {
    const ctx = ctxOf(req, res);
    res.json(await service.bulk(db, ctx, bulkBody.parse(req.body)));
    sendNotices(mail, ctx);
  });

  r.post(base, raisers, idempotent(db), async (req, res) => {
    const ctx = ctxOf(req, res);
    const row = await service.createDefect(db, ctx, createDefectBody.parse(req.body));
    res.status(201).json({ defect: toJson(row) });
    sendNotices(mail, ctx);
  });

  r.get(`${base}/:defectId/evidence`, member, async (req, res) => {
    const ctx = ctxOf(req, res);
    const d = await detail(db, ctx, one.parse(req.params).defectId);
    res.json(await evidenceOf(db, ctx.siteId, d.defect));
  });
  r.post(`${base}/:defectId/readings`, raisers, async (req, res) => {
    const ctx = ctxOf(req, res);
    res
      .status(201)
      .json(await service.addReadingLink(db, ctx, one.parse(req.params).defectId, linkReadingBody.parse(req.body)));
  });
  r.get("/sites/:siteId/boards/:boardId/reading-defects", member, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({ links: await defectsOfBoardReadings(db, siteId, boardId) });
  });

  r.get(`${base}/:defectId`, member, async (req, res) => {
    res.json(await detail(db, ctxOf(req, res), one.parse(req.params).defectId));
  });

  r.patch(`${base}/:defectId`, raisers, idempotent(db), async (req, res) => {
    const ctx = ctxOf(req, res);
    const row = await service.patchDefect(db, ctx, one.parse(req.params).defectId, patchDefectBody.parse(req.body));
    res.json({ defect: toJson(row) });
    sendNotices(mail, ctx);
  });

  r.post(`${base}/:defectId/status`, raisers, idempotent(db), async (req, res) => {
    const ctx = ctxOf(req, res);
    const row = await service.moveDefect(db, ctx, one.parse(req.params).defectId, transitionBody.parse(req.body));
    res.json({ defect: toJson(row) });
    sendNotices(mail, ctx);
  });

  r.post(`${base}/:defectId/assignee`, curator, async (req, res) => {
    const ctx = ctxOf(req, res);
    const row = await service.assignDefect(db, ctx, one.parse(req.params).defectId, assignBody.parse(req.body));
    res.json({ defect: toJson(row) });
    sendNotices(mail, ctx);
  });

  r.put(`${base}/:defectId/pin`, curator, async (req, res) => {
    await pin(db, ctxOf(req, res), one.parse(req.params).defectId, pinBody.parse(req.body));
    res.json(await detail(db, ctxOf(req, res), one.parse(req.params).defectId));
  });
  r.delete(`${base}/:defectId/pin`, curator, async (req, res) => {
    await unpin(db, ctxOf(req, res), one.parse(req.params).defectId, unpinBody.parse(req.body ?? {}).reason);
    res.json(await detail(db, ctxOf(req, res), one.parse(req.params).defectId));
  });

  return r;
}
