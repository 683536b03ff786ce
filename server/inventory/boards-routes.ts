/** Flood events, boards, sections and the site overview. Any member reads; the curator writes. */
import { Router } from "express";
import {
  boardParams,
  boardQuery,
  createBoardBody,
  createFloodEventBody,
  createSectionBody,
  deleteQuery,
  floodEventParams,
  patchBoardBody,
  patchFloodEventBody,
  patchSectionBody,
  sectionParams,
  siteParams,
  tilePageQuery,
} from "../../src/schemas/inventory";
import type { Db } from "../db";
import { requireSiteRole } from "../middleware/roles";
import * as reads from "./boards-reads";
import * as service from "./boards-service";
import { actorOf } from "./common";
import { overview } from "./overview";

const S = "/sites/:siteId";

export function boardRoutes(db: Db) {
  const r = Router();
  const anyMember = requireSiteRole(db, "site.read");
  const curator = requireSiteRole(db, "inventory.curate");

  r.get(`${S}/overview`, anyMember, async (req, res) => {
    res.json(await overview(db, siteParams.parse(req.params).siteId));
  });

  r.get(`${S}/flood-events`, anyMember, async (req, res) => {
    res.json(await reads.floodEventsOf(db, siteParams.parse(req.params).siteId));
  });
  r.post(`${S}/flood-events`, curator, async (req, res) => {
    const { siteId } = siteParams.parse(req.params);
    res
      .status(201)
      .json(await service.createFloodEvent(db, siteId, actorOf(res), createFloodEventBody.parse(req.body)));
  });
  r.patch(`${S}/flood-events/:floodEventId`, curator, async (req, res) => {
    const { siteId, floodEventId } = floodEventParams.parse(req.params);
    res.json(
      await service.patchFloodEvent(db, siteId, floodEventId, actorOf(res), patchFloodEventBody.parse(req.body)),
    );
  });

  r.get(`${S}/boards`, anyMember, async (req, res) => {
    res.json(await reads.boardsOf(db, siteParams.parse(req.params).siteId));
  });
  r.post(`${S}/boards`, curator, async (req, res) => {
    const { siteId } = siteParams.parse(req.params);
    res.status(201).json(await service.createBoard(db, siteId, actorOf(res), createBoardBody.parse(req.body)));
  });
  r.get(`${S}/boards/:boardId`, anyMember, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json(await reads.boardOf(db, siteId, boardId, boardQuery.parse(req.query).size));
  });
  r.get(`${S}/boards/:boardId/thumbnail`, anyMember, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json(await reads.thumbnailOf(db, siteId, boardId));
  });
  r.get(`${S}/boards/:boardId/tiles`, anyMember, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    const { after, size } = tilePageQuery.parse(req.query);
    res.json(await reads.tilesOf(db, siteId, boardId, after, size));
  });
  r.patch(`${S}/boards/:boardId`, curator, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json(await service.patchBoard(db, siteId, boardId, actorOf(res), patchBoardBody.parse(req.body)));
  });

  r.post(`${S}/boards/:boardId/sections`, curator, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res
      .status(201)
      .json(await service.createSection(db, siteId, boardId, actorOf(res), createSectionBody.parse(req.body)));
  });
  r.patch(`${S}/sections/:sectionId`, curator, async (req, res) => {
    const { siteId, sectionId } = sectionParams.parse(req.params);
    res.json(await service.patchSection(db, siteId, sectionId, actorOf(res), patchSectionBody.parse(req.body)));
  });
  r.delete(`${S}/sections/:sectionId`, curator, async (req, res) => {
    const { siteId, sectionId } = sectionParams.parse(req.params);
    await service.deleteSection(db, siteId, sectionId, actorOf(res), deleteQuery.parse(req.query).version);
    res.status(204).end();
  });
  return r;
}
