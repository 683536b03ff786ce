/** Positions: set-up by the curator, lookup and the side-panel detail for every member. */
import { Router } from "express";
import {
  boardParams,
  createPositionBody,
  deleteQuery,
  generatePositionsBody,
  lookupQuery,
  patchPositionBody,
  positionParams,
  reorderPositionsBody,
  siteParams,
} from "../../src/schemas/inventory";
import type { Db } from "../db";
import { requireSiteRole } from "../middleware/roles";
import { actorOf } from "./common";
import * as service from "./positions-service";
import { positionDetail } from "./survey-service";

const S = "/sites/:siteId";

export function positionRoutes(db: Db) {
  const r = Router();
  const anyMember = requireSiteRole(db, "site.read");
  const curator = requireSiteRole(db, "inventory.curate");

  r.post(`${S}/boards/:boardId/positions/generate`, curator, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.status(201).json({
      positions: await service.generatePositions(
        db,
        siteId,
        boardId,
        actorOf(res),
        generatePositionsBody.parse(req.body),
      ),
    });
  });
  r.post(`${S}/boards/:boardId/positions/reorder`, curator, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({
      positions: await service.reorderPositions(
        db,
        siteId,
        boardId,
        actorOf(res),
        reorderPositionsBody.parse(req.body).ids,
      ),
    });
  });
  r.post(`${S}/boards/:boardId/positions`, curator, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res
      .status(201)
      .json(await service.createPosition(db, siteId, boardId, actorOf(res), createPositionBody.parse(req.body)));
  });

  r.get(`${S}/positions/lookup`, anyMember, async (req, res) => {
    const { siteId } = siteParams.parse(req.params);
    res.json(await service.lookup(db, siteId, lookupQuery.parse(req.query).q));
  });
  r.get(`${S}/positions/:positionId`, anyMember, async (req, res) => {
    const { siteId, positionId } = positionParams.parse(req.params);
    res.json(await positionDetail(db, siteId, positionId));
  });
  r.patch(`${S}/positions/:positionId`, curator, async (req, res) => {
    const { siteId, positionId } = positionParams.parse(req.params);
    res.json(await service.patchPosition(db, siteId, positionId, actorOf(res), patchPositionBody.parse(req.body)));
  });
  r.delete(`${S}/positions/:positionId`, curator, async (req, res) => {
    const { siteId, positionId } = positionParams.parse(req.params);
    await service.deletePosition(db, siteId, positionId, actorOf(res), deleteQuery.parse(req.query).version);
    res.status(204).end();
  });
  return r;
}
