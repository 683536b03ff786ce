import { Router } from "express";
import { pipeline } from "node:stream/promises";
import { z } from "zod";
import {
  bulkAssignBody,
  boardParams,
  matchNamesBody,
  photoListQuery,
  photoParams,
  photoPatch,
  photoSettingsBody,
  RENDITIONS,
  uploadFields,
} from "../../src/schemas/photos";
import type { Role } from "../../src/domain/vocab";
import { can } from "../../src/domain/permissions";
import type { Db } from "../db";
import { AppError, forbidden } from "../errors";
import { idempotent } from "../idempotency/middleware";
import { requireSiteRole } from "../middleware/roles";
import * as reads from "./reads";
import * as service from "./service";
import type { PhotoStorage } from "./storage";
import { receiveFiles, removeTemporary } from "./upload";
import type { Jobs } from "../jobs";

const siteOnly = z.object({ siteId: z.uuid() });
const renditionParams = photoParams.extend({ rendition: z.enum(RENDITIONS) });

export function photoRoutes(db: Db, storage: PhotoStorage, jobs: Jobs) {
  const r = Router();
  const actor = (res: { locals: Express.Locals }) => ({
    user: res.locals.user!,
    role: res.locals.siteRole as Role | "admin",
  });

  r.post(
    "/sites/:siteId/photos",
    requireSiteRole(db, "photos.upload"),
    receiveFiles,
    idempotent(db),
    async (req, res) => {
      const files = (req.files as Express.Multer.File[] | undefined) ?? [];
      try {
        const { siteId } = siteOnly.parse(req.params);
        if (!files.length) throw new AppError(400, "no_files", 'Attach at least one picture in the "files" field.');
        const fields = uploadFields.parse(req.body ?? {});
        const ids = await service.uploadPhotos(db, storage, jobs, siteId, actor(res), files, fields);
        const photos = await reads.listPhotos(db, siteId, { ids, limit: ids.length, offset: 0 });
        // 201 with each photo 'processing': its display copy and thumbnail follow from the job queue.
        res.status(201).json({ photos });
      } finally {
        await removeTemporary(files);
      }
    },
  );

  r.get("/sites/:siteId/photos", requireSiteRole(db, "site.read"), async (req, res) => {
    const { siteId } = siteOnly.parse(req.params);
    const q = photoListQuery.parse(req.query);
    const ids = q.ids ? z.array(z.uuid()).max(500).parse(q.ids.split(",").filter(Boolean)) : undefined;
    res.json({ photos: await reads.listPhotos(db, siteId, { ...q, ids, unassigned: !!q.unassigned }) });
  });

  // Where a photo can be filed: the boards first, one board's positions when it is chosen, and a shoot's file
  // names matched on the server (never every position of the site; DEVELOPERS.md "Photo targets by board").
  r.get("/sites/:siteId/photo-targets", requireSiteRole(db, "site.read"), async (req, res) => {
    res.json({ boards: await reads.targetBoardsOf(db, siteOnly.parse(req.params).siteId) });
  });

  r.get("/sites/:siteId/boards/:boardId/photo-targets", requireSiteRole(db, "site.read"), async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json(await reads.boardTargetsOf(db, siteId, boardId));
  });

  r.post("/sites/:siteId/photo-targets/match", requireSiteRole(db, "photos.file"), async (req, res) => {
    const { siteId } = siteOnly.parse(req.params);
    const { names, boardId } = matchNamesBody.parse(req.body);
    res.json(await reads.matchNames(db, siteId, names, boardId));
  });

  r.get("/sites/:siteId/photo-settings", requireSiteRole(db, "site.read"), async (req, res) => {
    res.json({ settings: await service.getSettings(db, siteOnly.parse(req.params).siteId) });
  });

  r.put("/sites/:siteId/photo-settings", requireSiteRole(db, "photos.settings"), async (req, res) => {
    const { siteId } = siteOnly.parse(req.params);
    res.json({ settings: await service.saveSettings(db, siteId, actor(res), photoSettingsBody.parse(req.body)) });
  });

  r.get("/sites/:siteId/boards/:boardId/shoot-list", requireSiteRole(db, "site.read"), async (req, res) => {
    const { siteId, boardId } = boardParams.parse(req.params);
    res.json(await service.shootList(db, siteId, boardId));
  });

  r.post("/sites/:siteId/photos/assign", requireSiteRole(db, "photos.file"), async (req, res) => {
    const { siteId } = siteOnly.parse(req.params);
    res.json({ photos: await service.bulkAssign(db, siteId, actor(res), bulkAssignBody.parse(req.body)) });
  });

  r.get("/sites/:siteId/photos/:photoId", requireSiteRole(db, "site.read"), async (req, res) => {
    const { siteId, photoId } = photoParams.parse(req.params);
    res.json({ photo: await reads.photoOf(db, siteId, photoId) });
  });

  r.patch("/sites/:siteId/photos/:photoId", requireSiteRole(db, "photos.edit"), async (req, res) => {
    const { siteId, photoId } = photoParams.parse(req.params);
    res.json({ photo: await service.updatePhoto(db, siteId, photoId, actor(res), photoPatch.parse(req.body)) });
  });

  r.delete("/sites/:siteId/photos/:photoId", requireSiteRole(db, "photos.delete"), async (req, res) => {
    const { siteId, photoId } = photoParams.parse(req.params);
    await service.softDelete(db, siteId, photoId, actor(res));
    res.json({ ok: true });
  });

  r.get("/sites/:siteId/photos/:photoId/:rendition", requireSiteRole(db, "site.read"), async (req, res) => {
    const { siteId, photoId, rendition } = renditionParams.parse(req.params);
    // Originals keep the camera's EXIF, GPS included: only the people who shoot and curate get them.
    if (rendition === "original" && !can(res.locals.siteRole, "photos.original"))
      throw forbidden(
        "Originals keep the camera's location data; only the photographer and the curator download them.",
      );
    const file = await reads.renditionOf(db, storage, siteId, photoId, rendition);
    res.setHeader("Cache-Control", "private, max-age=86400");
    res.setHeader("X-Content-Type-Options", "nosniff");
    res.type(rendition === "original" ? mimeOf(file.format) : "image/jpeg");
    if (rendition === "original") res.attachment(file.originalName || `photo.${file.format}`);
    await pipeline(file.body, res);
  });

  return r;
}

const mimeOf = (f: string) =>
  ({ jpeg: "image/jpeg", png: "image/png", webp: "image/webp", tiff: "image/tiff", heif: "image/heif" })[f] ??
  "application/octet-stream";
