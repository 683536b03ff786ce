/**
 * `Idempotency-Key` on the creates that the phone's offline queue sends. Mount it after
 * the role check (and after multer on an upload), right before the handler:
 *
 *     r.post(path, requireSiteRole(db, …), idempotent(db), handler)
 *
 * Without the header the request runs as before. With it:
 * - first time: the key is claimed, the handler runs, a 2xx answer is stored with the key before
 *   it is sent; a refusal (4xx) or failure gives the key back, so a retry runs again;
 * - a repeat after success: the first answer again (same status and body, `Idempotent-Replayed:
 *   true`), and nothing is written;
 * - a repeat while the first is still running: 409 `idempotency_key_in_use` with Retry-After;
 * - the same key with another request (method, path or body differ): 422 `idempotency_key_reused`;
 * - a first attempt cut off mid-request (server stopped): 409 `idempotency_outcome_unknown`, so a
 *   person checks before anything is sent again — Tideline never guesses and never doubles a row.
 */
import { createHash } from "node:crypto";
import { createReadStream } from "node:fs";
import { rm } from "node:fs/promises";
import type { RequestHandler } from "express";
import { z } from "zod";
import type { Db } from "../db";
import { AppError } from "../errors";
import { unauthenticated } from "../middleware/roles";
import * as service from "./service";

export const IDEMPOTENCY_HEADER = "Idempotency-Key";

/** Printable ASCII, 8–200 characters: a UUID from the phone fits, so does any sensible client's key. */
const keySchema = z.string().regex(/^[\x21-\x7e]{8,200}$/);

async function fileDigest(path: string): Promise<string> {
  const h = createHash("sha256");
  for await (const chunk of createReadStream(path)) h.update(chunk as Buffer);
  return h.digest("hex");
}

/** What makes two requests "the same": method, path, JSON body and, for uploads, each file's bytes and name. */
async function fingerprintOf(req: Parameters<RequestHandler>[0]): Promise<string> {
  const h = createHash("sha256");
  h.update(`${req.method} ${req.originalUrl}\n`);
  h.update(JSON.stringify(req.body ?? null));
  const files = (req.files as Express.Multer.File[] | undefined) ?? [];
  for (const f of files) h.update(`\n${f.fieldname}:${f.originalname}:${f.size}:${await fileDigest(f.path)}`);
  return h.digest("hex");
}

/** A repeat that is not run leaves no temporary upload behind (multer's disk storage). */
async function dropUploads(req: Parameters<RequestHandler>[0]) {
  const files = (req.files as Express.Multer.File[] | undefined) ?? [];
  await Promise.allSettled(files.map((f) => rm(f.path, { force: true })));
}

export function idempotent(db: Db): RequestHandler {
  return async (req, res, next) => {
    const header = req.get(IDEMPOTENCY_HEADER);
    if (header === undefined) return next();
    const parsed = keySchema.safeParse(header);
    if (!parsed.success)
      return next(
        new AppError(
          400,
          "invalid_idempotency_key",
          "The Idempotency-Key header must be 8 to 200 printable characters without spaces.",
        ),
      );
    const user = res.locals.user;
    if (!user) return next(unauthenticated());
    const attempt = {
      userId: user.id,
      key: parsed.data,
      method: req.method,
      path: req.originalUrl,
      fingerprint: await fingerprintOf(req),
    };
    const c = await service.claim(db, attempt);
    if (c.kind !== "claimed") await dropUploads(req);
    if (c.kind === "replay") {
      res.setHeader("Idempotent-Replayed", "true");
      res.status(c.status).json(c.body);
      return;
    }
    if (c.kind === "mismatch")
      return next(
        new AppError(
          422,
          "idempotency_key_reused",
          "This Idempotency-Key was already used for a different request. Send a new key for a new record.",
        ),
      );
    if (c.kind === "running")
      return next(
        new AppError(
          409,
          "idempotency_key_in_use",
          "The same request is still being processed. Try again in a moment.",
          undefined,
          undefined,
          { "Retry-After": "2" },
        ),
      );
    if (c.kind === "unknown")
      return next(
        new AppError(
          409,
          "idempotency_outcome_unknown",
          "An earlier attempt of this request was cut off before it finished. Check whether the record exists before sending it again.",
        ),
      );

    // Claimed: keep the answer with the key before it leaves, give the key back on a refusal.
    const send = res.json.bind(res);
    let recorded = false;
    res.json = (body: unknown) => {
      if (recorded) return send(body);
      recorded = true;
      const status = res.statusCode;
      const record =
        status >= 200 && status < 300
          ? service.complete(db, attempt.userId, attempt.key, status, body)
          : service.release(db, attempt.userId, attempt.key);
      record
        .catch((e: unknown) =>
          // The record was written (or refused) all the same: answer it. A repeat then gets 409
          // 'outcome unknown' rather than a second row.
          console.warn(
            `[idempotency] could not record key for ${attempt.method} ${attempt.path}:`,
            (e as Error).message,
          ),
        )
        .finally(() => send(body));
      return res;
    };
    next();
  };
}
