import type { RENDITIONS } from "../../src/schemas/photos";
import type { Readable } from "node:stream";
import type { Db } from "../db";
import { AppError, notFound } from "../errors";
import * as repo from "./repository";
import { toPhoto } from "./service";
import { StorageNotFound, type PhotoStorage } from "./storage";

/** The reads of the photos domain: lists, one photo, and the bytes of one of its copies. */

export const listPhotos = async (db: Db, siteId: string, filter: repo.ListFilter) =>
  (await repo.listPhotos(db, siteId, filter)).map(toPhoto);

/** Where a photo may be filed on this site (boards, positions, components). */
export const targetsOf = (db: Db, siteId: string) => repo.listTargets(db, siteId);

async function liveRow(db: Db, siteId: string, photoId: string) {
  const row = await repo.findPhoto(db, siteId, photoId);
  if (!row || row.deletedAt) throw notFound("That photo");
  return row;
}

export const photoOf = async (db: Db, siteId: string, photoId: string) => toPhoto(await liveRow(db, siteId, photoId));

/**
 * One copy of a photo as a stream, with what the answer's headers need. 409 while the display
 * copy and thumbnail are still being made (or could not be); 404 when the file is gone from storage.
 */
export async function renditionOf(
  db: Db,
  storage: PhotoStorage,
  siteId: string,
  photoId: string,
  rendition: (typeof RENDITIONS)[number],
) {
  const row = await liveRow(db, siteId, photoId);
  if (rendition !== "original" && row.renditionState !== "ready")
    throw new AppError(
      409,
      row.renditionState === "failed" ? "rendition_failed" : "processing",
      row.renditionState === "failed"
        ? `This photo could not be processed: ${row.renditionError ?? "unknown reason"}`
        : "This photo is still being processed; its copies appear in a moment.",
    );
  const key = rendition === "original" ? row.originalKey : rendition === "display" ? row.displayKey : row.thumbKey;
  try {
    return { body: await storage.get(key), format: row.format, originalName: row.originalName };
  } catch (e) {
    if (e instanceof StorageNotFound)
      throw new AppError(
        404,
        "file_missing",
        "The picture's file is missing from storage; run the photo cleanup report.",
      );
    throw e;
  }
}

/** The thumbnail of a live nameplate photo of the site, or null (no such photo, or its file is missing). */
export async function nameplateThumb(
  db: Db,
  storage: PhotoStorage,
  siteId: string,
  photoId: string,
): Promise<Readable | null> {
  const photo = await repo.findNameplate(db, siteId, photoId);
  if (!photo) return null;
  try {
    return await storage.get(photo.thumbKey);
  } catch (e) {
    if (e instanceof StorageNotFound) return null;
    throw e;
  }
}
