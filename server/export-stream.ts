/**
 * Streaming a download without letting a slow or absent reader hurt anyone else:
 *
 * - the export never holds a database connection while it waits for the socket: callers
 *   read a page (one short query, the connection goes back to the pool), then `write()`
 *   it and wait for the socket to drain before asking for the next page; or (`runSpooledExport`)
 *   read everything in one pass at the database's speed into a temporary file, let the
 *   connection go, then send the file;
 * - a reader that takes nothing for `EXPORT_WRITE_TIMEOUT_MS` (default 30 s) is dropped,
 *   so a stalled download does not keep its memory and its slot for ever;
 * - one person runs at most `EXPORTS_PER_PERSON` (default 2) downloads at once across every
 *   instance on the database (slots in `export_slots`, with a lease); more get 429 with Retry-After.
 */
import { randomUUID } from "node:crypto";
import { once } from "node:events";
import { createReadStream, createWriteStream } from "node:fs";
import { mkdir, readdir, rm, stat } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { RequestHandler, Response } from "express";
import type { Db } from "./db";
import { dbFailureOf } from "./db-errors";
import { AppError } from "./errors";
import * as slots from "./export-repository";
import { processAlive } from "./process-alive";

const envInt = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return process.env[name] && Number.isFinite(v) && v > 0 ? v : fallback;
};

/** Read at each request, so a test or an operator can change them without a restart of the module. */
export const exportWriteTimeoutMs = () => envInt("EXPORT_WRITE_TIMEOUT_MS", 30_000);
export const exportsPerPerson = () => envInt("EXPORTS_PER_PERSON", 2);
const RETRY_AFTER_S = 10;

/** The reader went away or stopped reading; the export just stops (nothing to answer). */
export class ExportAborted extends Error {
  constructor(reason: "closed" | "write_timeout") {
    super(reason === "closed" ? "the client closed the download" : "the client read nothing in time");
  }
}

/** Downloads this process holds a slot for, per person (for tests and metrics). */
const running = new Map<string, number>();

/** How many downloads each person has running here (for tests and metrics). */
export const runningExports = () => new Map(running);

/** How long a slot counts without renewal: an instance that died stops holding its people's slots after this. */
export const exportSlotLeaseMs = () => envInt("EXPORT_SLOT_LEASE_MS", 60_000);

/**
 * Takes one of the person's download slots in PostgreSQL, so the cap holds across every
 * instance on the database: under a per-person transaction-scoped advisory lock, count the
 * person's slots whose lease has not run out and insert one if there is room. Returns the
 * slot's id, or null when the person already has `cap` running.
 */
export async function acquireExportSlot(db: Db, holder: string, cap = exportsPerPerson()): Promise<string | null> {
  return db.transaction().execute(async (trx) => {
    await slots.lockHolder(trx, holder);
    await slots.deleteLapsedSlots(trx, holder);
    if ((await slots.slotCount(trx, holder)) >= cap) return null;
    return slots.insertSlot(trx, holder, exportSlotLeaseMs());
  });
}

export async function renewExportSlot(db: Db, id: string) {
  await slots.extendSlot(db, id, exportSlotLeaseMs());
}

export async function releaseExportSlot(db: Db, id: string) {
  await slots.deleteSlot(db, id);
}

/**
 * Route middleware: takes one of the caller's download slots (in PostgreSQL, shared by every
 * instance) and refuses one too many with 429 and Retry-After. The slot's lease is renewed
 * while the response is open; the slot is freed once the export has written its body (before the
 * response ends) or when the response closes, however it ends; a renewal
 * or release that fails (database gone) is left to the lease to clean up.
 */
export function limitExports(db: Db): RequestHandler {
  return async (_req, res, next) => {
    const who = res.locals.user?.id ?? "anonymous";
    let slot: string | null;
    try {
      slot = await acquireExportSlot(db, who);
    } catch (e) {
      return next(e);
    }
    if (!slot) {
      res.setHeader("Retry-After", String(RETRY_AFTER_S));
      return next(
        new AppError(
          429,
          "too_many_exports",
          `You already have ${exportsPerPerson()} downloads running. Let one finish, then try again.`,
        ),
      );
    }
    const id = slot;
    running.set(who, (running.get(who) ?? 0) + 1);
    const renew = setInterval(() => renewExportSlot(db, id).catch(() => {}), Math.max(1000, exportSlotLeaseMs() / 3));
    renew.unref();
    let freed = false;
    const free = async () => {
      if (freed) return;
      freed = true;
      clearInterval(renew);
      const left = (running.get(who) ?? 1) - 1;
      if (left > 0) running.set(who, left);
      else running.delete(who);
      await releaseExportSlot(db, id).catch(() => {});
    };
    // A finished export frees its slot before its last byte (runExport), so the person's next
    // download never meets a slot still held by one they already have; a download that ends any
    // other way frees it when the response closes.
    res.locals.releaseExportSlot = free;
    res.once("close", () => void free());
    if (res.destroyed) void free();
    next();
  };
}

export interface ExportWriter {
  /** Writes a chunk; resolves once the socket can take more. Throws ExportAborted when the reader is gone or stalled. */
  write(chunk: string | Uint8Array): Promise<void>;
  end(): void;
  /** Rows (or positions) written of all, when the writer wants to know (a background job's progress). */
  progress?(done: number, total?: number): void;
}

export function exportWriter(res: Response, timeoutMs = exportWriteTimeoutMs()): ExportWriter {
  let closed = false;
  res.once("close", () => (closed = true));
  return {
    async write(chunk) {
      if (closed || res.destroyed) throw new ExportAborted("closed");
      if (res.write(chunk)) return;
      await new Promise<void>((resolve, reject) => {
        const done = (err?: Error) => {
          clearTimeout(timer);
          res.off("drain", onDrain);
          res.off("close", onClose);
          if (err) reject(err);
          else resolve();
        };
        const onDrain = () => done();
        const onClose = () => done(new ExportAborted("closed"));
        const timer = setTimeout(() => {
          done(new ExportAborted("write_timeout"));
          res.destroy(); // frees the socket and what is buffered for it
        }, timeoutMs);
        res.on("drain", onDrain);
        res.on("close", onClose);
      });
    },
    end() {
      if (!closed) res.end();
    },
  };
}

/**
 * Reads one page of an export, once more if its connection turned out to be dead: a
 * pooled connection whose backend was just terminated (a database restart while the
 * export waited on its reader) fails the first query sent on it. Pages are plain reads,
 * so asking again is safe; a second failure ends the download.
 */
export async function readPage<T>(read: () => Promise<T>): Promise<T> {
  try {
    return await read();
  } catch (e) {
    if (dbFailureOf(e) !== "unavailable") throw e;
    await new Promise((r) => setTimeout(r, 200));
    return read();
  }
}

/** Runs an export; a reader that left or stalled ends it quietly, anything else goes to the error handler. */
export async function runExport(res: Response, body: (out: ExportWriter) => Promise<void>) {
  const out = exportWriter(res);
  try {
    await body(out);
    await res.locals.releaseExportSlot?.();
    out.end();
  } catch (e) {
    if (e instanceof ExportAborted) return;
    throw e;
  }
}

/** Where spooled downloads wait to be sent (EXPORT_SPOOL_DIR, default the system's temporary directory). */
const spoolDir = () => process.env.EXPORT_SPOOL_DIR || tmpdir();

/**
 * Removes spool files whose process is gone (killed mid-download: its `finally` never ran). Called once at
 * start, before any download of this process; files of other running instances sharing the folder are kept.
 */
export async function removeSpoolLeftovers(dir = spoolDir()): Promise<string[]> {
  const removed: string[] = [];
  for (const name of await readdir(dir).catch(() => [] as string[])) {
    const m = /^tideline-export-(\d+)-[\w-]+\.part$/.exec(name);
    if (!m || (Number(m[1]) !== process.pid && processAlive(Number(m[1])))) continue;
    await rm(join(dir, name), { force: true });
    removed.push(name);
  }
  return removed;
}

/** Spool files this process holds now (for tests: each is gone once its download ends, however it ends). */
const spoolFiles = new Set<string>();
export const exportSpoolFiles = () => [...spoolFiles];

/**
 * Runs an export whose body reads the database in one pass (a cursor: one connection for the whole
 * read): the body writes into a temporary file at the database's speed, so the connection is held for
 * the read alone, never for the reader's download; then the file is sent with the socket's
 * back-pressure and write timeout (`exportWriter`), with its Content-Length, so a cut download can
 * never pass for a whole one. The headers go out only once the file is complete: a body that fails
 * (the database lost, a timeout) answers a clear error, not a short file. The file is deleted when
 * the download ends, however it ends (finished, the client gone or stalled, an error); a client gone
 * while the file is still being written stops the body at its next chunk (its connection goes back).
 * Disk use: one file per running download, the size of its CSV.
 */
export async function runSpooledExport(
  res: Response,
  headers: Record<string, string>,
  body: (out: ExportWriter) => Promise<void>,
) {
  const dir = spoolDir();
  await mkdir(dir, { recursive: true }); // a folder named in EXPORT_SPOOL_DIR, or a temporary one cleaned away
  const path = join(dir, `tideline-export-${process.pid}-${randomUUID()}.part`);
  spoolFiles.add(path);
  let gone = res.destroyed;
  const onClose = () => (gone = true);
  res.once("close", onClose);
  const ws = createWriteStream(path, { flags: "wx" });
  let failed: Error | null = null;
  ws.on("error", (e) => (failed = e));
  try {
    await body({
      async write(chunk) {
        if (gone) throw new ExportAborted("closed");
        if (failed) throw failed;
        if (!ws.write(chunk)) await once(ws, "drain"); // rejects if the file fails (disk full)
      },
      end() {},
    });
    ws.end();
    if (!ws.writableFinished) await once(ws, "finish");
    if (gone) return;
    for (const [name, value] of Object.entries(headers)) res.setHeader(name, value);
    res.setHeader("Content-Length", String((await stat(path)).size));
    const out = exportWriter(res);
    // The slot is freed before the last piece goes out: with a Content-Length the reader has the whole file
    // (and may ask for the next one) as soon as that piece arrives, before the response ends.
    const rs = createReadStream(path, { highWaterMark: 256 * 1024 });
    let last: Buffer | undefined;
    try {
      for await (const chunk of rs) {
        if (last) await out.write(last);
        last = chunk as Buffer;
      }
    } finally {
      rs.destroy();
    }
    await res.locals.releaseExportSlot?.();
    if (last) await out.write(last);
    out.end();
  } catch (e) {
    if (e instanceof ExportAborted) return;
    throw e;
  } finally {
    res.off("close", onClose);
    ws.destroy();
    await rm(path, { force: true }).catch(() => {});
    spoolFiles.delete(path);
  }
}
