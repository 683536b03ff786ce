/**
 * Condition survey report, tag labels and tag look-up.
 * - GET  /sites/:siteId/reports/survey.pdf  every member (viewers too): the report, streamed.
 *        Headers before the first byte: X-Report-Pages (page count), X-Report-Positions.
 * - GET  /sites/:siteId/labels.pdf           crew who handle parts (not viewers): tag labels.
 * - POST /sites/:siteId/tags/assign          volunteer, curator: next free tags for untagged positions.
 * - GET  /tags/:tag                          signed in: where a tag is, among the person's sites.
 */
import { Router, type Response } from "express";
import { assignTagsBody, labelsQuery, surveyReportQuery, tagParams } from "../../src/schemas/reports";
import type { Db } from "../db";
import { limitExports } from "../export-stream";
import { assignTags, findTag } from "../inventory/tags-service";
import { requireSiteRole, requireUser } from "../middleware/roles";
import type { PhotoStorage } from "../photos/storage";
import { labelItems, renderLabels } from "./labels";
import { prepareSurveyReport, writeSurveyReport } from "./service";
import { log } from "../log";

const attachment = (res: Response, filename: string) =>
  res.setHeader("Content-Disposition", `attachment; filename="${filename.replace(/[^A-Za-z0-9._-]/g, "_")}"`);

export function reportRoutes(db: Db, storage: PhotoStorage, publicUrl: string) {
  const r = Router();

  r.get(
    "/sites/:siteId/reports/survey.pdf",
    requireSiteRole(db, "reports.survey"),
    limitExports(db),
    async (req, res) => {
      const q = surveyReportQuery.parse(req.query);
      const user = res.locals.user!;
      const prepared = await prepareSurveyReport(db, req.params.siteId as string, q, { id: user.id, name: user.name });
      res.status(200);
      res.type("application/pdf");
      attachment(res, prepared.filename);
      res.setHeader("X-Report-Pages", String(prepared.plan.totalPages));
      res.setHeader("X-Report-Positions", String(prepared.data.boards.reduce((s, b) => s + b.positions.length, 0)));
      res.setHeader("Access-Control-Expose-Headers", "X-Report-Pages, X-Report-Positions");
      try {
        await writeSurveyReport(prepared, storage, res);
      } catch (e) {
        // Headers are gone: the only honest signal left is a cut-off response.
        if ((e as Error).message !== "report_aborted") log.error({ err: e }, "survey report failed mid-stream");
        res.destroy();
      }
    },
  );

  r.get("/sites/:siteId/labels.pdf", requireSiteRole(db, "reports.labels"), limitExports(db), async (req, res) => {
    const q = labelsQuery.parse(req.query);
    const { items, untagged } = await labelItems(db, req.params.siteId as string, q);
    const doc = renderLabels(items, {
      sheet: q.sheet,
      start: q.start,
      copies: q.copies,
      baseUrl: publicUrl,
      title: "Tideline tag labels",
    });
    res.type("application/pdf");
    attachment(res, `tag-labels-${q.sheet}.pdf`);
    res.setHeader("X-Labels", String(items.length * q.copies));
    res.setHeader("X-Labels-Untagged", String(untagged));
    doc.pipe(res);
    doc.end();
  });

  r.post("/sites/:siteId/tags/assign", requireSiteRole(db, "tags.assign"), async (req, res) => {
    const b = assignTagsBody.parse(req.body);
    res.json(await assignTags(db, req.params.siteId as string, b.positionIds, res.locals.user!.id, b.prefix));
  });

  r.get("/tags/:tag", requireUser, async (req, res) => {
    const { tag } = tagParams.parse(req.params);
    const user = res.locals.user!;
    res.json(await findTag(db, { id: user.id, isAdmin: user.isAdmin }, tag));
  });

  return r;
}
