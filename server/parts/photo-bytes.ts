/** Thumbnail bytes of a nameplate photo for the wanted list's print and share pages. */
import type { Readable } from "node:stream";
import type { Db } from "../db";
import { StorageNotFound, type PhotoStorage } from "../photos/storage";

/** The thumbnail of a live nameplate photo of the site, or null (no such photo, or its file is missing). */
export async function nameplateThumb(
  db: Db,
  storage: PhotoStorage,
  siteId: string,
  photoId: string,
): Promise<Readable | null> {
  const photo = await db
    .selectFrom("photos")
    .select(["id", "thumbKey"])
    .where("id", "=", photoId)
    .where("siteId", "=", siteId)
    .where("kind", "=", "nameplate")
    .where("deletedAt", "is", null)
    .executeTakeFirst();
  if (!photo) return null;
  try {
    return await storage.get(photo.thumbKey);
  } catch (e) {
    if (e instanceof StorageNotFound) return null;
    throw e;
  }
}
