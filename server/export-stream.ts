/**
 * Streaming a download without letting a slow or absent reader hurt anyone else:
 *
 * - the export never holds a database connection while it waits for the socket: callers
 *   read a page (one short query, the connection goes back to the pool), then `write()`
 *   it and wait for the socket to drain before asking for the next page;
 * - a reader that takes nothing for `EXPORT_WRITE_TIMEOUT_MS` (default 30 s) is dropped,
 *   so a stalled download does not keep its memory and its slot for ever;
 * - one person runs at most `EXPORTS_PER_PERSON` (default 2) downloads at once in this
 *   process; more get 429 with Retry-After.
 */
import type { RequestHandler, Response } from "express";
import { dbFailureOf } from "./db-errors";
import { AppError } from "./errors";

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

const running = new Map<string, number>();

/** How many downloads each person has running here (for tests and metrics). */
export const runningExports = () => new Map(running);

/**
 * Route middleware: counts the caller's running downloads and refuses one too many with
 * 429 and Retry-After. The slot is freed when the response closes, however it ends.
 */
export const limitExports: RequestHandler = (_req, res, next) => {
  const who = res.locals.user?.id ?? "anonymous";
  const now = running.get(who) ?? 0;
  if (now >= exportsPerPerson()) {
    res.setHeader("Retry-After", String(RETRY_AFTER_S));
    return next(
      new AppError(
        429,
        "too_many_exports",
        `You already have ${now} downloads running. Let one finish, then try again.`,
      ),
    );
  }
  running.set(who, now + 1);
  let freed = false;
  res.once("close", () => {
    if (freed) return;
    freed = true;
    const left = (running.get(who) ?? 1) - 1;
    if (left > 0) running.set(who, left);
    else running.delete(who);
  });
  next();
};

export interface ExportWriter {
  /** Writes a chunk; resolves once the socket can take more. Throws ExportAborted when the reader is gone or stalled. */
  write(chunk: string | Uint8Array): Promise<void>;
  end(): void;
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
    out.end();
  } catch (e) {
    if (e instanceof ExportAborted) return;
    throw e;
  }
}
