/**
 * Thumbnail bytes of a nameplate photo for the wanted list and its share page.
 * The photo storage module (server/photos/storage, branch `photos`) is not merged into
 * this branch yet, so no bytes can be read: callers answer 404 and the pages show
 * "no nameplate photo". Once it is merged, read `photo.thumbKey` through it here.
 */
import type { Db } from "../db";

export async function nameplateThumb(db: Db, siteId: string, photoId: string): Promise<{ body: Buffer; contentType: string } | null> {
  const photo = await db.selectFrom("photos").select(["id", "thumbKey"]).where("id", "=", photoId).where("siteId", "=", siteId)
    .where("kind", "=", "nameplate").where("deletedAt", "is", null).executeTakeFirst();
  if (!photo) return null;
  return null; // no storage module on this branch yet (see above)
}
