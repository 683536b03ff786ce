import type { RequestHandler } from "express";
import { mkdirSync } from "node:fs";
import { rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import multer from "multer";
import { AppError } from "../errors";

/**
 * Uploads stream to temporary files (multer's disk storage), never into memory: twenty
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

// Browsers send a file name as raw UTF-8 in filename="…"; busboy reads such parameters as
// latin1 unless told otherwise ("Ståle.jpg" would become "StÃ¥le.jpg"). multer passes the option on.
const upload = multer({
  storage: multer.diskStorage({ destination: TMP }),
  limits: UPLOAD_LIMITS,
  defParamCharset: "utf8",
}).array("files", UPLOAD_LIMITS.files);

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
