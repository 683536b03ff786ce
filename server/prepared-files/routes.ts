/**
 * Prepared files: the survey report and large CSV exports as background jobs.
 * - POST /sites/:siteId/prepared-files {kind, params}   any member whose role may have that kind:
 *        202 {file} with Location = its status URL; the job makes it into object storage.
 * - GET  /sites/:siteId/prepared-files                  the caller's files on the site + the keeping time.
 * - GET  /sites/:siteId/prepared-files/:fileId          one of them (state, progress, reason, links).
 * - GET  /sites/:siteId/prepared-files/:fileId/download the bytes (ready only; 409 before, 410 after expiry).
 * - POST /sites/:siteId/prepared-files/:fileId/retry    ask again after a failure or expiry (202).
 * - POST /sites/:siteId/prepared-files/:fileId/seen     dismiss its notice.
 * - GET  /prepared-files/notices                        signed in: made or failed files not yet seen.
 * Only the person who asked (or an instance admin) sees a file; others get 404.
 */
import { Router, type Response } from "express";
import { pipeline } from "node:stream/promises";
import { prepareBody, preparedFileParams } from "../../src/schemas/prepared-files";
import type { Db } from "../db";
import { limitExports } from "../export-stream";
import type { Jobs } from "../jobs";
import { log } from "../log";
import { requireSiteRole, requireUser } from "../middleware/roles";
import { StorageNotFound, type PhotoStorage } from "../photos/storage";
import { AppError } from "../errors";
import * as service from "./service";

const actorOf = (res: Response): service.Actor => ({ id: res.locals.user!.id, role: res.locals.siteRole! });

export function preparedFileRoutes(db: Db, storage: PhotoStorage, jobs: Jobs) {
  const r = Router();
  const base = "/sites/:siteId/prepared-files";
  const member = requireSiteRole(db, "site.read");

  r.post(base, member, async (req, res) => {
    const { siteId } = preparedFileParams.pick({ siteId: true }).parse(req.params);
    const b = prepareBody.parse(req.body);
    const file = await service.requestFile(db, jobs, siteId, actorOf(res), b.kind, b.params);
    res.status(202).location(file.statusUrl).json({ file });
  });

  r.get(base, member, async (req, res) => {
    const { siteId } = preparedFileParams.pick({ siteId: true }).parse(req.params);
    res.json(await service.listFiles(db, siteId, actorOf(res)));
  });

  r.get(`${base}/:fileId`, member, async (req, res) => {
    const { siteId, fileId } = preparedFileParams.parse(req.params);
    res.json({ file: await service.getFile(db, siteId, fileId, actorOf(res)) });
  });

  r.get(`${base}/:fileId/download`, member, limitExports(db), async (req, res) => {
    const { siteId, fileId } = preparedFileParams.parse(req.params);
    const row = await service.downloadOf(db, siteId, fileId, actorOf(res));
    let body;
    try {
      body = await storage.get(row.storageKey);
    } catch (e) {
      if (e instanceof StorageNotFound)
        throw new AppError(410, "file_expired", "That file is no longer stored. Ask for it again.");
      throw e;
    }
    res.status(200);
    res.setHeader("Content-Type", row.contentType);
    res.setHeader("Content-Disposition", `attachment; filename="${row.fileName.replace(/[^A-Za-z0-9._-]/g, "_")}"`);
    if (row.sizeBytes !== null) res.setHeader("Content-Length", String(row.sizeBytes));
    // Node's pipeline puts 7 'close' listeners on the response (its destroyer, end-of-stream twice, pipe); with the
    // request's own 4 (logging, metrics, compression, the export slot) that is 11, one over Node's warning level.
    // Counted, not leaked: each goes with its response.
    res.setMaxListeners(16);
    try {
      await pipeline(body, res);
    } catch (e) {
      // Headers are gone: a cut-off response is the only honest signal left.
      if (!res.destroyed) log.warn({ err: e }, "prepared file download cut off");
      res.destroy();
    }
  });

  r.post(`${base}/:fileId/retry`, member, async (req, res) => {
    const { siteId, fileId } = preparedFileParams.parse(req.params);
    const file = await service.retryFile(db, jobs, siteId, fileId, actorOf(res));
    res.status(202).location(file.statusUrl).json({ file });
  });

  r.post(`${base}/:fileId/seen`, member, async (req, res) => {
    const { siteId, fileId } = preparedFileParams.parse(req.params);
    res.json({ file: await service.markSeen(db, siteId, fileId, actorOf(res)) });
  });

  r.get("/prepared-files/notices", requireUser, async (_req, res) => {
    const u = res.locals.user!;
    res.json(await service.noticesOf(db, { id: u.id, isAdmin: u.isAdmin }));
  });

  return r;
}
