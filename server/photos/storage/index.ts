/**
 * Where photo files live, behind one small interface so the embedded default (local
 * disk) and S3-compatible object storage are interchangeable (one machine or a fleet of instances).
 * Chosen by PHOTO_STORAGE=disk|s3; see README "Photos" for the variables.
 */
import { tmpdir } from "node:os";
import { join } from "node:path";
import { projectRoot } from "../../../db/pg";
import { LocalDiskStorage } from "./local-disk";
import { S3Storage } from "./s3";
import type { PhotoStorage } from "./contract";

export { StorageNotFound, type PhotoStorage } from "./contract";

/** Keys are built here only: sites/<siteId>/<photoId>/<rendition>.<ext>. No user text in a key. */
export const photoKey = (siteId: string, photoId: string, rendition: "original" | "display" | "thumb", ext: string) =>
  `sites/${siteId}/${photoId}/${rendition}.${ext}`;

export function storageFromEnv(env: NodeJS.ProcessEnv = process.env): PhotoStorage {
  if ((env.PHOTO_STORAGE ?? "disk") === "s3") {
    const need = ["S3_BUCKET"] as const;
    for (const n of need) if (!env[n]) throw new Error(`PHOTO_STORAGE=s3 needs ${n}`);
    return new S3Storage({
      bucket: env.S3_BUCKET!,
      endpoint: env.S3_ENDPOINT || undefined,
      region: env.S3_REGION || "us-east-1",
      accessKeyId: env.S3_ACCESS_KEY_ID,
      secretAccessKey: env.S3_SECRET_ACCESS_KEY,
      forcePathStyle: env.S3_FORCE_PATH_STYLE === "1" || env.S3_FORCE_PATH_STYLE === "true",
    });
  }
  // Under vitest (seed tests) keep demo files out of the developer's own photo folder.
  const fallback = env.VITEST ? join(tmpdir(), "tideline-vitest-photos") : join(projectRoot, ".data", "photos");
  return new LocalDiskStorage(env.PHOTO_DIR || fallback);
}
