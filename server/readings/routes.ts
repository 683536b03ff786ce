import { Router, type Response } from "express";
import { z } from "zod";
import { text } from "../../src/schemas/common";
import {
  contactReadingBody,
  criteriaBody,
  groundCheckBody,
  groundHuntBody,
  insulationReadingBody,
  stepVoltageBody,
  tripTestBody,
  overrideBody,
  thermalScanBody,
} from "../../src/schemas/readings";
import type { Db } from "../db";
import { idempotent } from "../idempotency/middleware";
import { requireSiteRole } from "../middleware/roles";
import * as reads from "./reads";
import * as service from "./service";

const boardParams = z.object({ siteId: z.uuid(), boardId: z.uuid({ message: "boardId must be a UUID" }) });
const componentParams = z.object({ siteId: z.uuid(), componentId: z.uuid({ message: "componentId must be a UUID" }) });
const insulationQuery = z.object({ componentId: z.uuid().optional(), circuit: text().max(120).optional() });
/** One dry-out series: a component's, or a circuit's named by hand (no component). */
const seriesQuery = z.union(
  [
    z.object({ componentId: z.uuid({ message: "componentId must be a UUID" }) }),
    z.object({ circuit: text().min(1).max(120) }),
  ],
  { error: "Name the series: componentId, or circuit for a circuit named by hand." },
);

export function readingRoutes(db: Db) {
  const r = Router();
  const read = requireSiteRole(db, "site.read");
  const record = requireSiteRole(db, "readings.record");
  const curate = requireSiteRole(db, "readings.criteria");
  const once = idempotent(db); // the phone's offline queue repeats creates with an Idempotency-Key
  const user = (res: Response) => res.locals.user!.id;
  const S = "/sites/:siteId";

  r.get(`${S}/readings/targets`, read, async (req, res) => {
    res.json({ boards: await reads.readingTargets(db, req.params.siteId as string) });
  });
  r.get(`${S}/readings/criteria`, read, async (req, res) => {
    res.json({ criteria: await reads.loadCriteria(db, req.params.siteId as string) });
  });
  r.put(`${S}/readings/criteria`, curate, async (req, res) => {
    res.json({
      criteria: await service.saveCriteria(db, req.params.siteId as string, user(res), criteriaBody.parse(req.body)),
    });
  });

  // ---- per board ----
  r.get(`${S}/boards/:boardId/readings`, read, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json(await reads.boardReadings(db, siteId, boardId));
  });
  r.get(`${S}/boards/:boardId/insulation-readings`, read, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({ readings: await reads.listInsulation(db, siteId, { boardId, ...insulationQuery.parse(req.query) }) });
  });
  r.get(`${S}/boards/:boardId/dry-out`, read, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json(await reads.insulationSeriesOf(db, siteId, boardId, seriesQuery.parse(req.query)));
  });
  r.post(`${S}/boards/:boardId/insulation-readings`, record, once, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.status(201).json({
      reading: await service.recordInsulation(db, siteId, boardId, user(res), insulationReadingBody.parse(req.body)),
    });
  });
  r.get(`${S}/boards/:boardId/contact-readings`, read, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({ readings: await reads.listContacts(db, siteId, { boardId }) });
  });
  r.get(`${S}/boards/:boardId/thermal-scans`, read, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({ scans: await reads.listThermal(db, siteId, { boardId }) });
  });
  r.get(`${S}/boards/:boardId/ground-checks`, read, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({ checks: await reads.listGroundChecks(db, siteId, { boardId }) });
  });
  r.get(`${S}/boards/:boardId/ground-checks/latest`, read, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({ check: await reads.latestGroundCheck(db, siteId, boardId) });
  });
  r.post(`${S}/boards/:boardId/ground-checks`, record, once, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.status(201).json({
      check: await service.recordGroundCheck(db, siteId, boardId, user(res), groundCheckBody.parse(req.body)),
    });
  });

  r.get(`${S}/boards/:boardId/step-voltage-tests`, read, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({ tests: await reads.listStepTests(db, siteId, { boardId }) });
  });
  r.post(`${S}/boards/:boardId/step-voltage-tests`, record, once, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res
      .status(201)
      .json({ test: await service.recordStepTest(db, siteId, boardId, user(res), stepVoltageBody.parse(req.body)) });
  });
  r.get(`${S}/boards/:boardId/ground-hunts`, read, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json({ hunts: await reads.listGroundHunts(db, siteId, boardId) });
  });
  r.post(`${S}/boards/:boardId/ground-hunts`, record, once, async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res
      .status(201)
      .json({ step: await service.recordHuntStep(db, siteId, boardId, user(res), groundHuntBody.parse(req.body)) });
  });

  // ---- per component ----
  r.get(`${S}/components/:componentId/trip-tests`, read, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json({ tests: await reads.listTripTests(db, siteId, { componentId }) });
  });
  r.post(`${S}/components/:componentId/trip-tests`, record, once, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res
      .status(201)
      .json({ test: await service.recordTripTest(db, siteId, componentId, user(res), tripTestBody.parse(req.body)) });
  });
  r.get(`${S}/components/:componentId/readings`, read, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json(await reads.componentReadings(db, siteId, componentId));
  });
  r.get(`${S}/components/:componentId/insulation-readings`, read, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json({ readings: await reads.listInsulation(db, siteId, { componentId }) });
  });
  r.get(`${S}/components/:componentId/contact-readings`, read, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json({ readings: await reads.listContacts(db, siteId, { componentId }) });
  });
  r.post(`${S}/components/:componentId/contact-readings`, record, once, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.status(201).json({
      reading: await service.recordContact(db, siteId, componentId, user(res), contactReadingBody.parse(req.body)),
    });
  });
  r.get(`${S}/components/:componentId/thermal-scans`, read, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json({ scans: await reads.listThermal(db, siteId, { componentId }) });
  });
  r.post(`${S}/components/:componentId/thermal-scans`, record, once, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res
      .status(201)
      .json({ scan: await service.recordThermal(db, siteId, componentId, user(res), thermalScanBody.parse(req.body)) });
  });
  r.put(`${S}/components/:componentId/reading-override`, curate, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    res.json({
      override: await service.saveOverride(db, siteId, componentId, user(res), overrideBody.parse(req.body)),
    });
  });
  r.delete(`${S}/components/:componentId/reading-override`, curate, async (req, res) => {
    const { siteId, componentId } = componentParams.parse(req.params);
    await service.removeOverride(db, siteId, componentId, user(res));
    res.json({ override: null });
  });

  return r;
}
