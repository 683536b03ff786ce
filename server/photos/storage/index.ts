/**
 * Where photo files live, behind one small interface so the embedded default (local
 * disk) and S3-compatible object storage are interchangeable (one machine or a fleet of instances).
 * Chosen by PHOTO_STORAGE=disk|s3; see README "Photos" for the variables.
 */
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { Readable } from "node:stream";
import { projectRoot } from "../../../db/pg";
import { LocalDiskStorage } from "./local-disk";
import { S3Storage } from "./s3";

export interface PhotoStorage {
  readonly kind: "disk" | "s3";
  put(key: string, body: Buffer, contentType: string): Promise<void>;
  /** Stores a file from disk, streamed (an upload multer wrote to a temporary file). */
  putFile(key: string, path: string, contentType: string): Promise<void>;
  /** Throws when the store cannot be reached or written (the readiness check). */
  check(): Promise<void>;
  /** The stored bytes as a stream; rejects with StorageNotFound when the key is absent. */
  get(key: string): Promise<Readable>;
  /**
   * The stored bytes in one buffer (the rendition job, which decodes them whole): one read of the
   * file, or the SDK's own collection of the body, rather than a stream gathered chunk by chunk.
   */
  getBytes(key: string): Promise<Buffer>;
  /**
   * What sharp decodes the stored bytes from (the rendition job): on disk the file's own path, so
   * libvips reads it in its worker thread and nothing passes through the event loop (a missing file
   * fails the decode with sharp's "Input file is missing", not a StorageNotFound); elsewhere `getBytes`.
   */
  decodeSource(key: string): Promise<string | Buffer>;
  /** Deleting an absent key is not an error. */
  delete(key: string): Promise<void>;
  /** Every key under the prefix (the cleanup command compares them with the table). */
  listKeys(prefix?: string): Promise<string[]>;
}

export class StorageNotFound extends Error {
  constructor(key: string) {
    super(`No stored object ${key}`);
  }
}

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
