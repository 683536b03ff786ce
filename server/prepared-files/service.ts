/**
 * Prepared files: the condition survey report and large CSV exports, made by a background
 * job into object storage and downloaded from a link. This module is the only
 * writer of `prepared_files`.
 *
 *   request → row "queued" + job "prepared-files.render" in one transaction (202 at once)
 *   job     → "rendering" (attempt n) → temporary file → object store → "ready" (expires_at)
 *             a failure is retried by the queue (retryLimit, backoff); the last one is "failed"
 *             with its reason, and the person may ask again (retry)
 *   notice  → ready/failed files the person has not yet seen; e-mail for a ready report
 *   purge   → a scheduled job deletes stored objects whose keeping time ran out ("expired")
 *
 * Each attempt writes its own object key and its final update is conditional on its attempt
 * number, so an attempt cut off by a worker restart (and run again elsewhere) can never
 * overwrite the newer one.
 */
import { randomUUID } from "node:crypto";
import { rm, stat } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { PreparedFilesTable } from "../../db/types";
import { paths } from "../../src/config/paths";
import { can } from "../../src/domain/permissions";
import type { Role } from "../../src/domain/vocab";
import {
  PREPARED_KIND_ACTION,
  PREPARED_KIND_LABELS,
  type PreparedFile,
  type PreparedKind,
} from "../../src/schemas/prepared-files";
import type { Db } from "../db";
import { AppError, forbidden, notFound } from "../errors";
import type { JobContext, Jobs } from "../jobs";
import { compose } from "../mail/compose";
import { queueMail } from "../mail/outbox";
import type { PhotoStorage } from "../photos/storage";
import { contentTypeOf, extensionOf, parseParams, renderTo } from "./render";
import * as repo from "./repository";

export const RENDER_JOB = "prepared-files.render";
export const PURGE_JOB = "prepared-files.purge";

const envNumber = (name: string, fallback: number, env = process.env) => {
  const v = Number(env[name]);
  return env[name] && Number.isFinite(v) && v > 0 ? v : fallback;
};
/** How long a made file is kept (PREPARED_FILE_RETENTION_HOURS, default 72 h = three days). */
export const retentionHours = (env = process.env) => envNumber("PREPARED_FILE_RETENTION_HOURS", 72, env);
/** The clean-up's schedule (PREPARED_FILES_PURGE_CRON, default every 15 minutes; "off" = none). */
export const purgeCron = (env = process.env) => env.PREPARED_FILES_PURGE_CRON ?? "*/15 * * * *";
/** Files one person may have waiting or being made on a site at once. */
export const pendingPerPerson = (env = process.env) => envNumber("PREPARED_FILES_PENDING_PER_PERSON", 5, env);

type Row = Pick<
  PreparedFilesTable,
  "fileName" | "contentType" | "progressTotal" | "error" | "storageKey" | "sizeBytes" | "startedAt"
> & {
  id: string;
  siteId: string;
  requestedBy: string;
  kind: PreparedKind;
  params: Record<string, unknown>;
  state: PreparedFile["state"];
  progressDone: number;
  attempts: number;
  createdAt: Date;
  finishedAt: Date | null;
  expiresAt: Date | null;
  seenAt: Date | null;
  version: number;
};

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

export const statusUrlOf = (r: { siteId: string; id: string }) => `/api/sites/${r.siteId}/prepared-files/${r.id}`;

export function toJson(r: Row): PreparedFile {
  return {
    id: r.id,
    siteId: r.siteId,
    kind: r.kind,
    params: r.params,
    state: r.state,
    progressDone: r.progressDone,
    progressTotal: r.progressTotal,
    attempts: r.attempts,
    error: r.error,
    fileName: r.fileName,
    sizeBytes: r.sizeBytes === null ? null : Number(r.sizeBytes),
    createdAt: iso(r.createdAt)!,
    finishedAt: iso(r.finishedAt),
    expiresAt: iso(r.expiresAt),
    seenAt: iso(r.seenAt),
    statusUrl: statusUrlOf(r),
    downloadUrl: r.state === "ready" ? `${statusUrlOf(r)}/download` : null,
  };
}

export interface Actor {
  id: string;
  role: Role | "admin";
}

const mayAsk = (role: Role | "admin", kind: PreparedKind) => role === "admin" || can(role, PREPARED_KIND_ACTION[kind]);

/** Queues a file: the row and its job commit together; answers the row as it stands (queued). */
export async function requestFile(
  db: Db,
  jobs: Jobs,
  siteId: string,
  actor: Actor,
  kind: PreparedKind,
  params: Record<string, unknown>,
): Promise<PreparedFile> {
  if (!mayAsk(actor.role, kind)) throw forbidden();
  parseParams(kind, params); // a ZodError here is a 400 with the fields, before anything is stored
  return db.transaction().execute(async (trx) => {
    // One person's waiting files on a site are capped, under a lock per person and site, so
    // a double click or a script cannot fill the queue.
    await repo.lockRequester(trx, actor.id, siteId);
    const n = await repo.pendingCount(trx, siteId, actor.id);
    if (n >= pendingPerPerson())
      throw new AppError(
        429,
        "too_many_prepared_files",
        `You already have ${pendingPerPerson()} files being made on this site. Let one finish, then ask again.`,
        undefined,
        undefined,
        { "Retry-After": "30" },
      );
    const row = await repo.insertFile(trx, {
      siteId,
      requestedBy: actor.id,
      kind,
      params: JSON.stringify(params),
      fileName: `${kind.replace("_", "-")}.${extensionOf(kind)}`,
      contentType: contentTypeOf(kind),
    });
    await jobs.enqueue(RENDER_JOB, { fileId: row.id }, { trx });
    return toJson(row as Row);
  });
}

async function ownRow(db: Db, siteId: string, fileId: string, actor: Actor) {
  const row = (await repo.findFile(db, siteId, fileId)) as Row | undefined;
  // Another person's file is not confirmed to exist; an instance admin may see any.
  if (!row || (row.requestedBy !== actor.id && actor.role !== "admin")) throw notFound("That file");
  return row;
}

export async function getFile(db: Db, siteId: string, fileId: string, actor: Actor) {
  return toJson(await ownRow(db, siteId, fileId, actor));
}

/** The person's files on the site, newest first (the last 50). */
export async function listFiles(db: Db, siteId: string, actor: Actor) {
  const rows = (await repo.filesOf(db, siteId, actor.id, 50)) as Row[];
  return { files: rows.map(toJson), retentionHours: retentionHours() };
}

/**
 * The in-app notices of a person: files made (or failed) and not yet seen, on the sites where
 * they are still a member (or any site, for an instance admin).
 */
export async function noticesOf(db: Db, user: { id: string; isAdmin: boolean }) {
  const rows = await repo.unseenFinished(db, user, 20);
  return { notices: rows.map((r) => ({ ...toJson(r as unknown as Row), siteName: r.siteName })) };
}

/** Dismisses the notice (idempotent). */
export async function markSeen(db: Db, siteId: string, fileId: string, actor: Actor) {
  await ownRow(db, siteId, fileId, actor);
  const row = (await repo.setSeen(db, fileId)) as Row;
  return toJson(row);
}

/** Asks again for a file that could not be made (or whose keeping time ran out). 409 otherwise. */
export async function retryFile(db: Db, jobs: Jobs, siteId: string, fileId: string, actor: Actor) {
  const current = await ownRow(db, siteId, fileId, actor);
  if (!mayAsk(actor.role, current.kind)) throw forbidden();
  return db.transaction().execute(async (trx) => {
    const row = (await repo.requeueFailed(trx, fileId)) as Row | undefined;
    if (!row)
      throw new AppError(
        409,
        "not_retryable",
        current.state === "ready"
          ? "That file is ready: download it."
          : "That file is still being made; only a file that failed or was removed can be asked for again.",
        undefined,
        toJson(current),
      );
    await jobs.enqueue(RENDER_JOB, { fileId }, { trx });
    return toJson(row);
  });
}

/** Where a ready file's bytes are; 404 for another person's file, 409 before it is ready, 410 after it expired. */
export async function downloadOf(db: Db, siteId: string, fileId: string, actor: Actor) {
  const row = await ownRow(db, siteId, fileId, actor);
  if (!mayAsk(actor.role, row.kind)) throw forbidden();
  if (row.state === "expired")
    throw new AppError(410, "file_expired", "That file was removed after its keeping time. Ask for it again.");
  if (row.state !== "ready" || !row.storageKey)
    throw new AppError(409, "file_not_ready", "That file is not ready yet.", undefined, toJson(row));
  return row as Row & { storageKey: string };
}

// ── the jobs ────────────────────────────────────────────────────────────────

export interface PreparedDeps {
  db: Db;
  jobs: Jobs;
  photoStorage: PhotoStorage;
  publicUrl: string;
}

const keyOf = (r: { siteId: string; id: string }, attempt: number, kind: PreparedKind) =>
  `prepared/${r.siteId}/${r.id}/${attempt}.${extensionOf(kind)}`;

/** Progress written at most this often per file (ms): the page polls it. */
const PROGRESS_EVERY_MS = 750;

/** The handler of "prepared-files.render". */
export async function renderFile(deps: PreparedDeps, data: { fileId: string }, ctx: JobContext) {
  const { db } = deps;
  // Claim: queued (or left "rendering" by an attempt cut off by a restart) → rendering, attempt n.
  const claimed = (await repo.claimForRender(db, data.fileId)) as Row | undefined;
  if (!claimed) return; // removed, already made, or asked for again under a newer job
  const attempt = claimed.attempts;
  ctx.log.info({ fileId: claimed.id, kind: claimed.kind, attempt }, "preparing file");
  const mine = (trx: Db, patch: Parameters<typeof repo.updateAttempt>[3]) =>
    repo.updateAttempt(trx, claimed.id, attempt, patch);

  // The person must still be allowed to have it (removed from the crew, role changed).
  const who = await repo.requesterOf(db, claimed.requestedBy, claimed.siteId);
  const role = who?.isAdmin ? "admin" : who?.role;
  if (!who || !role || !mayAsk(role, claimed.kind)) {
    await mine(db, {
      state: "failed",
      error: "You are no longer allowed to have this file on this site.",
      finishedAt: new Date(),
    });
    return;
  }

  let last = 0;
  let pending: Promise<unknown> = Promise.resolve();
  const progress = (done: number, total?: number) => {
    const now = Date.now();
    if (now - last < PROGRESS_EVERY_MS && done !== total) return;
    last = now;
    pending = pending
      .then(() => mine(db, { progressDone: done, ...(total !== undefined ? { progressTotal: total } : {}) }))
      .catch(() => {}); // progress is a courtesy: a failed write never fails the file
  };

  const tmp = join(tmpdir(), `tideline-prepared-${claimed.id}-${attempt}-${randomUUID()}.part`);
  const key = keyOf(claimed, attempt, claimed.kind);
  try {
    const { fileName } = await renderTo(
      db,
      deps.photoStorage,
      { kind: claimed.kind, params: claimed.params, siteId: claimed.siteId, requester: { id: who.id, name: who.name } },
      tmp,
      progress,
    );
    await pending;
    await deps.photoStorage.putFile(key, tmp, claimed.contentType);
    const { size } = await stat(tmp);
    const hours = retentionHours();
    const done = await db.transaction().execute(async (trx) => {
      const row = (await repo.finishAttempt(
        trx,
        claimed.id,
        attempt,
        {
          state: "ready",
          storageKey: key,
          sizeBytes: size,
          fileName,
          error: null,
          finishedAt: new Date(),
          seenAt: null,
        },
        hours,
      )) as Row | undefined;
      if (row && row.kind === "survey_report" && who.email)
        await queueMail(trx, deps.jobs, readyMail(deps.publicUrl, row, who.name, who.email), {
          type: "prepared_file",
          id: row.id,
        });
      return row;
    });
    if (!done) {
      // This attempt was overtaken (a newer attempt, or the file was asked for again): drop its object.
      await deps.photoStorage.delete(key).catch(() => {});
      ctx.log.info({ fileId: claimed.id, attempt }, "prepared file attempt overtaken; its object removed");
    } else {
      // An earlier attempt's process can die after its upload left it (kill -9, a lost host): the object can still
      // land in the store, referenced by no row, so the purge would never find it. The attempt that won removes them.
      for (let k = 1; k < attempt; k++) await deps.photoStorage.delete(keyOf(claimed, k, claimed.kind)).catch(() => {});
    }
  } catch (e) {
    await deps.photoStorage.delete(key).catch(() => {});
    const reason = reasonOf(e);
    if (ctx.lastAttempt) {
      await mine(db, { state: "failed", error: reason, finishedAt: new Date(), seenAt: null }).catch(() => {});
    } else {
      // Back to waiting: the queue runs it again after its retry delay.
      await mine(db, { state: "queued", error: `Attempt ${attempt} failed (${reason}); trying again.` }).catch(
        () => {},
      );
    }
    throw e;
  } finally {
    await rm(tmp, { force: true }).catch(() => {});
  }
}

/** A reason a person can read; the full error goes to the log with the request id. */
function reasonOf(e: unknown): string {
  const err = e as { code?: string; message?: string; name?: string };
  if (err?.name === "ZodError") return "The options of this file are no longer valid.";
  if (err?.code && /^(08|57P|53)/.test(err.code)) return "The database could not be reached.";
  if (err?.code === "57014") return "The database took too long to answer.";
  if (err?.code === "ENOSPC") return "The server ran out of disk space while writing the file.";
  const msg = String(err?.message ?? e).slice(0, 300);
  return msg || "An unexpected error.";
}

function readyMail(publicUrl: string, row: Row, name: string, email: string) {
  const url = `${publicUrl}${paths.reports.href(row.siteId)}#prepared-files`;
  const body = compose({
    subject: `Tideline: your ${PREPARED_KIND_LABELS[row.kind].toLowerCase()} is ready`,
    greeting: `Hello ${name},`,
    body: [
      `The file you asked for, ${row.fileName}, is ready to download.`,
      `It is kept for ${retentionHours()} hours, then removed; you can ask for it again at any time.`,
      "The report records observations and readings; it certifies nothing as safe.",
    ],
    action: { label: "Open your prepared files", url },
    footer: ["You get this e-mail because you asked Tideline for this report."],
  });
  return { to: email, ...body };
}

/** The handler of "prepared-files.purge": removes stored objects whose keeping time ran out. */
export async function purgeExpired(deps: Pick<PreparedDeps, "db" | "photoStorage">, now = new Date()) {
  const due = await repo.expiredFiles(deps.db, now, 500);
  let removed = 0;
  for (const f of due) {
    if (f.storageKey) await deps.photoStorage.delete(f.storageKey);
    // Deleted first, then marked: a crash in between leaves a row that is purged again (delete is idempotent).
    removed += await repo.markExpired(deps.db, f.id);
  }
  return { removed };
}

/** A file is left waiting or in the making this long after its last start before its job is looked for. */
const ORPHAN_GRACE_MS = 5 * 60_000;

/**
 * Files whose job is gone while they still say "queued" or "being made": the worker of their last
 * attempt died and the queue failed that attempt by expiry, so no handler wrote "failed". They are
 * failed here (part of the scheduled clean-up), with a notice, so nobody waits on them for ever.
 */
export async function failOrphaned(deps: Pick<PreparedDeps, "db" | "jobs">, now = new Date()) {
  const waiting = await repo.staleWaiting(deps.db, new Date(now.getTime() - ORPHAN_GRACE_MS), 500);
  if (!waiting.length) return { failed: 0 };
  const live = await deps.jobs.liveFor(
    RENDER_JOB,
    "fileId",
    waiting.map((f) => f.id),
  );
  let failed = 0;
  for (const f of waiting.filter((w) => !live.has(w.id))) {
    failed += await repo.failStale(
      deps.db,
      f.id,
      f.attempts,
      "Its last attempt was cut off (the server making it stopped). Ask for it again.",
      now,
    );
  }
  return { failed };
}

export function definePreparedFileJobs(jobs: Jobs, deps: Omit<PreparedDeps, "jobs">, env = process.env) {
  const full = { ...deps, jobs };
  jobs.define(RENDER_JOB, (data: { fileId: string }, ctx) => renderFile(full, data, ctx), {
    retryLimit: envNumber("PREPARED_FILE_RETRY_LIMIT", 2, env),
    retryDelay: envNumber("PREPARED_FILE_RETRY_DELAY_SECONDS", 15, env),
    retryBackoff: true,
    // A live render renews a lease; a render whose worker died is failed by the queue's maintenance
    // once the lease lapses and retried elsewhere (about lease + TIDELINE_JOB_MAINTENANCE_SECONDS +
    // retry delay: under two minutes by default, where the bare 15-minute expiry took a quarter hour).
    leaseSeconds: envNumber("PREPARED_FILE_LEASE_SECONDS", 60, env),
    // The cap of one live attempt (a hung render), no longer what a crash waits for.
    expireInSeconds: envNumber("PREPARED_FILE_JOB_EXPIRE_SECONDS", 60 * 60, env),
  });
  jobs.define(
    PURGE_JOB,
    async (_data, ctx) => {
      const r = await purgeExpired(full);
      if (r.removed) ctx.log.info(r, "expired prepared files removed");
      const o = await failOrphaned(full);
      if (o.failed) ctx.log.warn(o, "prepared files whose job was gone marked failed");
    },
    { retryLimit: 1, retryDelay: 60 },
  );
  const cron = purgeCron(env);
  if (cron === "off") jobs.never(PURGE_JOB);
  else jobs.every(PURGE_JOB, cron, {}, "UTC");
}
