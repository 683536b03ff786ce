/**
 * What every photo store does (server/photos/storage/index.ts chooses one by PHOTO_STORAGE), and the
 * error a store gives for an absent key. Kept apart from the choosing so each store depends on the
 * contract only, not on the module that builds it.
 */
import type { Readable } from "node:stream";

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
