import type { User } from "lucia";
import { randomUUID } from "node:crypto";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, conflict, forbidden, notFound } from "../errors";
import type { BulkAssign, PhotoPatch, UploadFields } from "../../src/schemas/photos";
import { PHOTO_KINDS, type PhotoKind, type Role } from "../../src/domain/vocab";
import { can } from "../../src/domain/permissions";
import type { Jobs } from "../jobs";
import { log } from "../log";
import { inspectImage, renderDisplay, renderThumb, type ImageFacts } from "./images";
import * as repo from "./repository";
import { photoKey, type PhotoStorage } from "./storage";
import { assertMayAttach, resolveTarget } from "./targets";

export interface UploadedFile {
  originalname: string;
  /** The upload as a temporary file (multer's disk storage). */
  path: string;
  size: number;
}
type Actor = { user: User; role: Role | "admin" };

export const RENDITION_JOB = "photo.renditions";

/** What the client sees of a photo row: no storage keys, dates as ISO strings. */
export function toPhoto(r: NonNullable<repo.PhotoRow>) {
  const { originalKey: _o, displayKey: _d, thumbKey: _t, deletedAt: _x, ...rest } = r;
  return {
    ...rest,
    capturedAt: r.capturedAt ? r.capturedAt.toISOString() : null,
    createdAt: r.createdAt.toISOString(),
  };
}

/**
 * The upload answers once the originals are stored; renditions are a job.
 * 1. Every file is inspected (type from the bytes, pixel limit, cut-off file, capture
 *    facts) without decoding it, so one refused file stores nothing.
 * 2. The originals are streamed from their temporary files into the photo store.
 * 3. One transaction inserts the rows ('processing') and enqueues their rendition jobs;
 *    no file I/O happens inside it. If it fails, the stored originals are deleted again.
 * A crash between 2 and 3 can leave files without rows: `npm run photos:cleanup` reports them.
 */
export async function uploadPhotos(
  db: Db,
  storage: PhotoStorage,
  jobs: Jobs,
  siteId: string,
  actor: Actor,
  files: UploadedFile[],
  fields: UploadFields,
) {
  await assertMayAttach(db, siteId, actor.user, actor.role, fields);
  const target = await resolveTarget(db, siteId, fields);
  const inspected: Array<{ file: UploadedFile; facts: ImageFacts; id: string; name: string }> = [];
  for (const file of files) {
    const name = safeName(file.originalname);
    inspected.push({ file, name, facts: await inspectImage(file.path, name), id: randomUUID() });
  }
  const written: string[] = [];
  try {
    for (const { file, facts, id } of inspected) {
      const key = photoKey(siteId, id, "original", facts.ext);
      written.push(key);
      await storage.putFile(key, file.path, facts.mime).catch((e) => {
        log.error({ err: e }, "photo store write failed");
        throw new AppError(
          503,
          "storage_failed",
          "The photo store did not accept the file; nothing was saved. Try again in a moment.",
        );
      });
    }
    const ids = await db.transaction().execute(async (trx) => {
      const ids: string[] = [];
      for (const { file, facts, id, name } of inspected) {
        const keys = {
          originalKey: photoKey(siteId, id, "original", facts.ext),
          displayKey: photoKey(siteId, id, "display", "jpg"),
          thumbKey: photoKey(siteId, id, "thumb", "jpg"),
        };
        await repo.insertPhoto(trx, {
          id,
          siteId,
          ...target,
          ...keys,
          kind: fields.kind,
          caption: fields.caption,
          originalName: name,
          format: facts.format,
          width: facts.width,
          height: facts.height,
          bytes: file.size,
          capturedAt: facts.capturedAt,
          cameraModel: facts.cameraModel,
          uploadedBy: actor.user.id,
          renditionState: "processing",
        });
        await recordAudit(trx, {
          siteId,
          entityType: "photo",
          entityId: id,
          action: "upload",
          actorId: actor.user.id,
          boardId: target.boardId,
          positionId: target.positionId,
          after: { kind: fields.kind, originalName: name, ...target },
        });
        await jobs.enqueue(
          RENDITION_JOB,
          { siteId, photoId: id, hevc: facts.hevc, originalKey: keys.originalKey } satisfies RenditionJob,
          { trx },
        );
        ids.push(id);
      }
      return ids;
    });
    // Committed: this process's worker (if it runs one) starts the renditions now, not at its next poll.
    jobs.wake(RENDITION_JOB);
    return ids;
  } catch (e) {
    await Promise.allSettled(written.map((k) => storage.delete(k)));
    throw e;
  }
}

/** A rendition job's payload; `originalKey` is absent from jobs queued before 2026-12-03 evening. */
export interface RenditionJob {
  siteId: string;
  photoId: string;
  hevc: boolean;
  originalKey?: string;
}

/**
 * The rendition job: read the original back from the store, decode it once, write the
 * display copy and the thumbnail, mark the photo ready. A picture that cannot be decoded
 * is marked failed at once (trying again would not help); a store or database hiccup is
 * retried, and marked failed with its reason after the last attempt.
 * Nothing waits that need not: the display copy's decode starts from the original the job names
 * while the row is looked up (on disk libvips reads the file itself, nothing passes through the
 * event loop), and the display copy is stored while the thumbnail is encoded.
 * Also the sweep "photo.stranded-sweep" (`failStranded`, PHOTO_STRANDED_CRON): a photo whose job's last
 * attempt died with its worker is marked failed instead of processing for ever.
 */
export function definePhotoJobs(
  jobs: Jobs,
  deps: { db: Db; photoStorage: PhotoStorage },
  onRendered?: (seconds: number) => void,
  env = process.env,
) {
  jobs.define<RenditionJob>(
    RENDITION_JOB,
    async ({ siteId, photoId, hevc, originalKey }, ctx) => {
      const t0 = performance.now();
      /** The display copy from a stored original; on disk libvips reads the file itself (`decodeSource`). */
      const displayFrom = async (key: string, name: string) =>
        renderDisplay(await deps.photoStorage.decodeSource(key), { hevc }, name);
      // The decode starts at once from the original the job names, beside the row's lookup; settled
      // at once, so a failure is never an unhandled rejection when the row then says "skip" (a
      // repeated delivery of a finished job decodes once for nothing; it writes nothing).
      const early = originalKey
        ? displayFrom(originalKey, "photo").then(
            (display) => ({ display }),
            (error: unknown) => ({ error }),
          )
        : undefined;
      const row = await repo.findPhoto(deps.db, siteId, photoId);
      if (!row || row.renditionState === "ready") return;
      const name = row.originalName || "photo";
      /** A refused picture is failed now; anything else is retried, and failed on its last attempt. */
      const failed = async (e: unknown, why: string) => {
        const permanent = e instanceof AppError;
        if (permanent || ctx.lastAttempt)
          await repo.setRenditionState(
            deps.db,
            photoId,
            "failed",
            String(permanent ? ((e as AppError).fields?.file ?? e.message) : why),
          );
        if (!permanent) throw e;
      };
      let display: Buffer;
      try {
        const made = early && row.originalKey === originalKey ? await early : undefined;
        if (made && "error" in made) throw made.error;
        display = made ? made.display : await displayFrom(row.originalKey, name);
      } catch (e) {
        return failed(e, "the display copy could not be made; try uploading it again.");
      }
      const storingDisplay = deps.photoStorage.put(row.displayKey, display, "image/jpeg");
      storingDisplay.catch(() => undefined); // awaited below; never an unhandled rejection meanwhile
      let thumb: Buffer;
      try {
        thumb = await renderThumb(display, name);
      } catch (e) {
        await storingDisplay.catch(() => undefined);
        return failed(e, "the thumbnail could not be made; try uploading it again.");
      }
      try {
        await Promise.all([storingDisplay, deps.photoStorage.put(row.thumbKey, thumb, "image/jpeg")]);
      } catch (e) {
        return failed(e, "the display copy could not be stored; try uploading it again.");
      }
      await repo.setRenditionState(deps.db, photoId, "ready", null);
      onRendered?.((performance.now() - t0) / 1000);
    },
    { retryLimit: 3, retryDelay: 5, retryBackoff: true, expireInSeconds: 300 },
  );
  jobs.define(
    STRANDED_SWEEP_JOB,
    async (_data, ctx) => {
      const r = await failStranded({ db: deps.db, jobs });
      if (r.failed) ctx.log.warn(r, "photos whose rendition job was gone marked failed");
    },
    { retryLimit: 1, retryDelay: 60 },
  );
  const cron = strandedCron(env);
  if (cron === "off") jobs.never(STRANDED_SWEEP_JOB);
  else jobs.every(STRANDED_SWEEP_JOB, cron, {}, "UTC");
}

export const STRANDED_SWEEP_JOB = "photo.stranded-sweep";
/** Every five minutes by default; PHOTO_STRANDED_CRON=off switches the sweep off. */
export const strandedCron = (env = process.env) => env.PHOTO_STRANDED_CRON ?? "*/5 * * * *";

/** A photo is left processing this long after its upload before its rendition job is looked for. */
const STRANDED_GRACE_MS = 5 * 60_000;

/** What a photo failed by the sweep says under "Not processed" (the photographer uploads it again). */
export const STRANDED_REASON = "its processing was cut off (the server stopped); try uploading it again.";

/**
 * Photos still "processing" whose rendition job is no longer waiting, retrying or running: the worker
 * of the last attempt died and the queue failed that attempt by expiry (or the job was cancelled or
 * is gone), so no handler wrote "failed" and the photo would say "Processing…" for ever. They are
 * marked failed here with a reason, as prepared files are (`failOrphaned`), through the same
 * `jobs.liveFor`. A photo whose job is queued, active or set to retry is never touched, nor one
 * younger than the grace; the update holds only while the row still says processing.
 */
export async function failStranded(deps: { db: Db; jobs: Pick<Jobs, "liveFor"> }, now = new Date()) {
  const waiting = await repo.processingSince(deps.db, new Date(now.getTime() - STRANDED_GRACE_MS), 500);
  if (!waiting.length) return { failed: 0 };
  const live = await deps.jobs.liveFor(
    RENDITION_JOB,
    "photoId",
    waiting.map((p) => p.id),
  );
  let failed = 0;
  for (const p of waiting.filter((w) => !live.has(w.id)))
    failed += await repo.failProcessing(deps.db, p.id, STRANDED_REASON);
  return { failed };
}

/** File names are shown, never used as paths; keep them printable and short. */
// eslint-disable-next-line no-control-regex -- stripping control characters is the point
const safeName = (n: string) => (n || "photo").replace(/[\u0000-\u001f\u007f]/g, "").slice(0, 200);

async function currentOr404(db: Db, siteId: string, photoId: string) {
  const row = await repo.findPhoto(db, siteId, photoId);
  if (!row || row.deletedAt) throw notFound("That photo");
  return row;
}

const mayEdit = (actor: Actor, row: NonNullable<repo.PhotoRow>) =>
  can(actor.role, "photos.file") || (actor.role === "volunteer" && row.uploadedBy === actor.user.id);

export async function updatePhoto(db: Db, siteId: string, photoId: string, actor: Actor, patch: PhotoPatch) {
  return db.transaction().execute(async (trx) => {
    const row = await currentOr404(trx, siteId, photoId);
    if (!mayEdit(actor, row)) throw forbidden("Only the photographer and the curator tag photos.");
    const retarget = ["boardId", "positionId", "componentId", "defectId"].some(
      (k) => k in patch && patch[k as keyof PhotoPatch] !== undefined,
    );
    if (retarget && actor.role === "volunteer") throw forbidden("Volunteers may not move photos to other positions.");
    if (row.version !== patch.version)
      throw conflict("Someone changed this photo meanwhile. Here is how it is now.", toPhoto(row));
    const set: Record<string, unknown> = {};
    if (patch.kind) set.kind = patch.kind;
    if (patch.caption !== undefined) set.caption = patch.caption;
    if (retarget) {
      const t = await resolveTarget(trx, siteId, {
        boardId: patch.boardId ?? undefined,
        positionId: patch.positionId ?? undefined,
        componentId: patch.componentId ?? undefined,
        defectId: patch.defectId ?? undefined,
      });
      Object.assign(set, {
        boardId: t.boardId,
        positionId: t.positionId,
        componentId: t.componentId,
        defectId: t.defectId,
      });
    }
    // The version is checked again by the UPDATE itself: a concurrent save that won the row lock
    // makes this one match nothing, so it is refused and no audit row is written for it.
    if (!(await repo.updatePhoto(trx, siteId, photoId, patch.version, set)))
      throw await staleConflict(trx, siteId, photoId, "Someone changed this photo meanwhile. Here is how it is now.");
    await recordAudit(trx, {
      siteId,
      entityType: "photo",
      entityId: photoId,
      action: "update",
      actorId: actor.user.id,
      boardId: (set.boardId as string) ?? row.boardId,
      positionId: (set.positionId as string) ?? row.positionId,
      before: pick(row, Object.keys(set)),
      after: set,
    });
    return toPhoto((await repo.findPhoto(trx, siteId, photoId))!);
  });
}

/** 409 with the photo as it is now (or 404 when it was deleted meanwhile). */
async function staleConflict(trx: Db, siteId: string, photoId: string, message: string) {
  const fresh = await repo.findPhoto(trx, siteId, photoId);
  if (!fresh || fresh.deletedAt) return notFound("That photo");
  return conflict(message, toPhoto(fresh));
}

const pick = (o: Record<string, unknown>, keys: string[]) => Object.fromEntries(keys.map((k) => [k, o[k]]));

/** Files a batch to positions in one transaction; one stale photo refuses the whole batch. */
export async function bulkAssign(db: Db, siteId: string, actor: Actor, body: BulkAssign) {
  return db.transaction().execute(async (trx) => {
    const out = [];
    for (const item of body.items) {
      const row = await currentOr404(trx, siteId, item.photoId);
      if (row.version !== item.version)
        throw conflict(`${row.originalName || "A photo"} was changed meanwhile; reload the batch.`, toPhoto(row));
      const t = await resolveTarget(trx, siteId, { positionId: item.positionId });
      const set = { boardId: t.boardId, positionId: t.positionId, ...(item.kind ? { kind: item.kind } : {}) };
      if (!(await repo.updatePhoto(trx, siteId, item.photoId, item.version, set)))
        throw await staleConflict(
          trx,
          siteId,
          item.photoId,
          `${row.originalName || "A photo"} was changed meanwhile; reload the batch.`,
        );
      await recordAudit(trx, {
        siteId,
        entityType: "photo",
        entityId: item.photoId,
        action: "assign",
        actorId: actor.user.id,
        boardId: t.boardId,
        positionId: t.positionId,
        before: { positionId: row.positionId, kind: row.kind },
        after: set,
      });
      out.push(toPhoto((await repo.findPhoto(trx, siteId, item.photoId))!));
    }
    return out;
  });
}

/** Soft delete: the row and files stay for 30 days (`npm run photos:cleanup -- --purge`). */
export async function softDelete(db: Db, siteId: string, photoId: string, actor: Actor) {
  await db.transaction().execute(async (trx) => {
    const row = await currentOr404(trx, siteId, photoId);
    await repo.softDeletePhoto(trx, photoId);
    await recordAudit(trx, {
      siteId,
      entityType: "photo",
      entityId: photoId,
      action: "delete",
      actorId: actor.user.id,
      boardId: row.boardId,
      positionId: row.positionId,
      before: { originalName: row.originalName, kind: row.kind },
    });
  });
}

export const DEFAULT_REQUIRED: PhotoKind[] = ["as_found", "nameplate"];

export async function getSettings(db: Db, siteId: string) {
  return (await repo.getSettings(db, siteId)) ?? { requiredKinds: DEFAULT_REQUIRED, version: 1 };
}

export async function saveSettings(
  db: Db,
  siteId: string,
  actor: Actor,
  body: { requiredKinds: PhotoKind[]; version: number },
) {
  return db.transaction().execute(async (trx) => {
    const before = await getSettings(trx, siteId);
    const kinds = PHOTO_KINDS.filter((k) => body.requiredKinds.includes(k));
    const saved = await repo.upsertSettings(trx, siteId, kinds, body.version);
    if (!saved || before.version !== body.version)
      throw conflict("The required shots were changed meanwhile.", await getSettings(trx, siteId));
    await recordAudit(trx, {
      siteId,
      entityType: "photo_settings",
      entityId: siteId,
      action: "update",
      actorId: actor.user.id,
      before,
      after: saved,
    });
    return saved;
  });
}

export async function shootList(db: Db, siteId: string, boardId: string) {
  const board = await repo.findBoard(db, siteId, boardId);
  if (!board) throw notFound("That board");
  const { requiredKinds } = await getSettings(db, siteId);
  const rows = await repo.boardPositionKinds(db, siteId, boardId);
  const positions = rows.map((r) => ({
    id: r.id,
    designation: r.designation,
    photoCount: r.photoCount,
    have: PHOTO_KINDS.filter((k) => r.kinds.includes(k)),
    missing: requiredKinds.filter((k) => !r.kinds.includes(k)),
  }));
  const shotsRequired = positions.length * requiredKinds.length;
  const shotsTaken = shotsRequired - positions.reduce((n, p) => n + p.missing.length, 0);
  return {
    board,
    requiredKinds,
    positions,
    complete: positions.filter((p) => !p.missing.length).length,
    total: positions.length,
    shotsTaken,
    shotsRequired,
  };
}
