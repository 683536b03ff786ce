import type { Request, RequestHandler } from "express";
import { randomBytes } from "node:crypto";
import { createWriteStream, mkdirSync, type WriteStream } from "node:fs";
import { rm } from "node:fs/promises";
import { pipeline } from "node:stream/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import multer from "multer";
import { AppError } from "../errors";

/**
 * Uploads stream to temporary files (`TemporaryFiles` below), never whole into memory: twenty
 * 40 MB pictures in one request would otherwise sit in the heap. UPLOAD_TMP_DIR chooses
 * the folder (default: the system's temporary folder); the route removes the files when done.
 */
const TMP = process.env.UPLOAD_TMP_DIR ?? join(tmpdir(), "tideline-uploads");
mkdirSync(TMP, { recursive: true });

/** Explicit limits: a 48 MP phone JPEG is ~25 MB. */
export const UPLOAD_LIMITS = {
  fileSize: 40 * 1024 * 1024,
  files: 20,
  fields: 20,
  fieldSize: 4 * 1024,
  fieldNameSize: 100,
  parts: 45,
  headerPairs: 200,
};

/**
 * Bytes of one file that may wait in memory between the socket and its temporary file: busboy's file
 * stream (multer 2.5's `fileHwm`; @types/multer does not list it yet) and the file's write stream
 * each hold up to this much. multer's own disk storage writes through a stream with Node's default
 * 16 KiB buffer, below one 64 KiB socket read: every read waited for its own write, a trip to libuv's
 * pool and back to the event loop, about forty for a 2.6 MB photo. Here the socket keeps being read
 * while a write is out, and the chunks that arrived meanwhile go to disk in one `writev`: a few
 * writes a photo. At most 2 × 1 MiB of a file is in memory at a time, whatever its size (busboy
 * reads a request's files one after another), so twenty 40 MB pictures never sit in the heap.
 */
const FILE_BUFFER = 1024 * 1024;

/**
 * multer's storage engine for uploads (its documented interface: `_handleFile`, `_removeFile`):
 * each file streams to a random name in the temporary folder, as multer's disk storage does, with
 * the larger buffers above. A failed write leaves no file; a file still being written when the
 * request fails (the client gone, a limit hit) has its stream closed before the file is removed,
 * so no write recreates it.
 */
class TemporaryFiles implements multer.StorageEngine {
  private writing = new WeakMap<object, WriteStream>();

  _handleFile(
    _req: Request,
    file: Express.Multer.File,
    cb: (error?: unknown, info?: Partial<Express.Multer.File>) => void,
  ) {
    if (file.stream.destroyed) return cb(new Error("The upload stream was closed before it could be stored."));
    const filename = randomBytes(16).toString("hex");
    const path = join(TMP, filename);
    const out = createWriteStream(path, { highWaterMark: FILE_BUFFER });
    file.path = path; // multer removes a file that is still being written through this (see _removeFile)
    this.writing.set(file, out);
    pipeline(file.stream, out).then(
      () => {
        this.writing.delete(file);
        cb(null, { destination: TMP, filename, path, size: out.bytesWritten });
      },
      (err: unknown) => {
        this.writing.delete(file);
        // Removed once its descriptor is closed: a file still being opened would otherwise come back.
        void whenClosed(out)
          .then(() => rm(path, { force: true }))
          .finally(() => cb(err));
      },
    );
  }

  _removeFile(_req: Request, file: Express.Multer.File, cb: (error: Error | null) => void) {
    const out = this.writing.get(file);
    out?.destroy();
    void (out ? whenClosed(out) : Promise.resolve())
      .then(() => rm(file.path, { force: true }))
      .then(() => cb(null), cb);
  }
}

const whenClosed = (out: WriteStream) =>
  out.closed ? Promise.resolve() : new Promise<void>((resolve) => out.once("close", () => resolve()));

// Browsers send a file name as raw UTF-8 in filename="…"; busboy reads such parameters as
// latin1 unless told otherwise ("Ståle.jpg" would become "StÃ¥le.jpg"). multer passes the option on.
const options: multer.Options & { fileHwm: number } = {
  storage: new TemporaryFiles(),
  limits: UPLOAD_LIMITS,
  defParamCharset: "utf8",
  fileHwm: FILE_BUFFER,
};
const upload = multer(options).array("files", UPLOAD_LIMITS.files);

/** Removes the request's temporary files (also those of a refused or failed upload). */
export async function removeTemporary(files: Array<{ path: string }> | undefined) {
  await Promise.allSettled((files ?? []).map((f) => rm(f.path, { force: true })));
}

const MESSAGES: Record<string, [number, string]> = {
  LIMIT_FILE_SIZE: [
    413,
    `A file is larger than ${UPLOAD_LIMITS.fileSize / 1024 / 1024} MB; Tideline accepts pictures up to that size.`,
  ],
  LIMIT_FILE_COUNT: [413, `At most ${UPLOAD_LIMITS.files} files per upload.`],
  LIMIT_UNEXPECTED_FILE: [413, `Send the pictures in the "files" field, at most ${UPLOAD_LIMITS.files} at a time.`],
  LIMIT_FIELD_COUNT: [413, "Too many form fields."],
  LIMIT_FIELD_VALUE: [413, "A form field is too long."],
  LIMIT_FIELD_KEY: [413, "A form field name is too long."],
  LIMIT_PART_COUNT: [413, "Too many parts in the upload."],
};

/** multer, with its errors turned into clear JSON (413 too large, 400 unreadable), never 500. */
export const receiveFiles: RequestHandler = (req, res, next) => {
  upload(req, res, (err?: unknown) => {
    if (!err) return next();
    // multer removes what it wrote for a failed request; any file already complete goes too.
    void removeTemporary(req.files as Express.Multer.File[] | undefined);
    const code = (err as { code?: string }).code ?? "";
    const known = MESSAGES[code];
    if (known) return next(new AppError(known[0], code === "LIMIT_FILE_SIZE" ? "too_large" : "too_many", known[1]));
    next(new AppError(400, "bad_upload", "The upload could not be read (it may have been interrupted); try again."));
  });
};
