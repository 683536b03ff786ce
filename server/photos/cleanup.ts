import type { Db } from "../db";
import * as repo from "./repository";
import type { PhotoStorage } from "./storage";

/** Soft-deleted photos are kept this long, then purged. */
export const KEEP_DELETED_DAYS = 30;

export interface OrphanReport {
  /** Stored files no row points at (e.g. a crash between writing files and committing). */
  filesWithoutRows: string[];
  /** Rows whose file is missing from storage. */
  rowsWithoutFiles: Array<{ photoId: string; missing: string[] }>;
  storedKeys: number;
  rows: number;
}

export async function findOrphans(db: Db, storage: PhotoStorage): Promise<OrphanReport> {
  const [rows, keys] = await Promise.all([repo.allPhotoKeys(db), storage.listKeys("sites/")]);
  const stored = new Set(keys.filter((k) => !k.endsWith(".partial")));
  const referenced = new Set<string>();
  const rowsWithoutFiles: OrphanReport["rowsWithoutFiles"] = [];
  for (const r of rows) {
    // A photo still processing (or whose processing failed) has no renditions yet: only its original is expected.
    const want = r.renditionState === "ready" ? [r.originalKey, r.displayKey, r.thumbKey] : [r.originalKey];
    want.forEach((k) => referenced.add(k));
    const missing = want.filter((k) => !stored.has(k));
    if (missing.length) rowsWithoutFiles.push({ photoId: r.id, missing });
  }
  return {
    filesWithoutRows: keys.filter((k) => !referenced.has(k)),
    rowsWithoutFiles,
    storedKeys: keys.length,
    rows: rows.length,
  };
}

/**
 * Removes photos soft-deleted more than 30 days before `now`: the row first (so nothing
 * points at a file being deleted), then its files. A file that fails to delete becomes
 * an orphan the next report shows.
 */
export async function purgeDeleted(db: Db, storage: PhotoStorage, now: Date) {
  const before = new Date(now.getTime() - KEEP_DELETED_DAYS * 24 * 3600 * 1000);
  const expired = await repo.expiredDeleted(db, before);
  for (const p of expired) {
    await repo.deletePhotoRow(db, p.id);
    await Promise.allSettled([p.originalKey, p.displayKey, p.thumbKey].map((k) => storage.delete(k)));
  }
  return expired.map((p) => p.id);
}

/** Deletes files no row points at (only with --delete-orphans; the report comes first). */
export async function deleteOrphanFiles(storage: PhotoStorage, keys: string[]) {
  for (const k of keys) await storage.delete(k);
}
