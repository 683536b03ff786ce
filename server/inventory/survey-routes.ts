/**
 * The condition survey on a component. Volunteers and the curator log inspections and
 * custody moves; only the curator edits nameplates and decides dispositions.
 */
import { Router } from "express";
import { deviceTimeOf } from "../middleware/device-time";
import {
  componentParams,
  createInspectionBody,
  custodyBody,
  dispositionBody,
  patchComponentBody,
  siteParams,
} from "../../src/schemas/inventory";
import type { Db } from "../db";
import { idempotent } from "../idempotency/middleware";
import { requireSiteRole } from "../middleware/roles";
import { actorOf } from "./common";
import * as service from "./survey-service";

const C = "/sites/:siteId/components/:componentId";

export function surveyRoutes(db: Db) {
  const r = Router();
  const anyMember = requireSiteRole(db, "site.read");
  const fieldCrew = requireSiteRole(db, "inventory.log");
  const curator = requireSiteRole(db, "inventory.curate");

  r.patch(C, curator, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json(await service.patchComponent(db, siteId, componentId, actorOf(res), patchComponentBody.parse(req.body)));
  });
  r.post(`${C}/inspections`, fieldCrew, idempotent(db), async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res
      .status(201)
      .json(
        await service.createInspection(
          db,
          siteId,
          componentId,
          actorOf(res),
          createInspectionBody.parse(req.body),
          deviceTimeOf(req),
        ),
      );
  });
  r.post(`${C}/custody`, fieldCrew, idempotent(db), async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res
      .status(201)
      .json(
        await service.moveCustody(
          db,
          siteId,
          componentId,
          { id: actorOf(res), role: res.locals.siteRole ?? "viewer" },
          custodyBody.parse(req.body),
          deviceTimeOf(req),
        ),
      );
  });
  r.get(`${C}/custody-options`, fieldCrew, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json(await service.custodyOptions(db, siteId, componentId));
  });
  r.get("/sites/:siteId/tags/next", fieldCrew, async (req, res) => {
    res.json(await service.nextTag(db, siteParams.parse(req.params).siteId));
  });
  r.get(`${C}/recommendation`, anyMember, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json(await service.recommendation(db, siteId, componentId));
  });
  r.put(`${C}/disposition`, curator, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json(await service.decideDisposition(db, siteId, componentId, actorOf(res), dispositionBody.parse(req.body)));
  });
  return r;
}
