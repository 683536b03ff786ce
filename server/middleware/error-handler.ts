import type { ErrorRequestHandler } from "express";
import { ZodError } from "zod";
import { dbFailureOf, PoolQueueFull } from "../db-errors";
import { AppError } from "../errors";
import { log } from "../log";
import { mapPgError } from "./pg-errors";

function zodFields(err: ZodError): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.join(".") : "_";
    fields[key] ??= issue.message;
  }
  return fields;
}

/**
 * Every error leaves as `{"error":{"code","message","fields?","requestId"}}`; no stack ever
 * reaches the client. The request id (also in the X-Request-Id header) is what a person
 * quotes and what finds the request's log lines.
 */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const logger = req.log ?? log;
  const requestId = req.id === undefined ? undefined : String(req.id);
  const fail = (status: number, error: Record<string, unknown>) =>
    res.status(status).json({ error: { ...error, requestId } });
  if (res.headersSent) {
    // Half a file must not look like a whole one: cut the connection so the download fails.
    logger.error({ err, dbFailure: dbFailureOf(err) ?? undefined }, "error after the response started; connection cut");
    res.destroy();
    return;
  }
  if (err instanceof ZodError) {
    const fields = zodFields(err);
    const first = Object.entries(fields)[0];
    fail(400, {
      code: "invalid_input",
      message: first ? `Check ${first[0] === "_" ? "the request" : first[0]}: ${first[1]}` : "Invalid input.",
      fields,
    });
    return;
  }
  if (err instanceof AppError) {
    const body: Record<string, unknown> = { code: err.code, message: err.message };
    if (err.fields) body.fields = err.fields;
    if (err.details !== undefined) body.current = err.details;
    if (err.headers) res.set(err.headers);
    fail(err.status, body);
    return;
  }
  const pg = mapPgError(err);
  if (pg) {
    logger.warn({ sqlState: (err as { code: string }).code, reason: (err as Error).message }, "database refused input");
    fail(pg.status, { code: pg.code, message: pg.message });
    return;
  }
  // body-parser and multer errors carry a status or a code of their own.
  const status =
    typeof err?.status === "number" ? err.status : typeof err?.statusCode === "number" ? err.statusCode : 500;
  if (status === 413 || err?.code === "LIMIT_FILE_SIZE") {
    fail(413, { code: "too_large", message: "That is larger than Tideline accepts." });
    return;
  }
  if (status >= 400 && status < 500) {
    const message =
      err?.type === "entity.parse.failed" ? "The request body is not valid JSON." : "The request could not be read.";
    fail(status, { code: "bad_request", message });
    return;
  }
  const dbFailure = dbFailureOf(err);
  if (dbFailure) {
    // The database went away or is overloaded: this request fails, the process and the pool carry on.
    if (err instanceof PoolQueueFull) {
      // Too many statements already wait for this process's connections: refused at once (server/db.ts
      // `boundQueue`), logged there once a second; the queue drains in well under a second.
      res.setHeader("Retry-After", "1");
      fail(503, {
        code: "db_unavailable",
        message: "The server has more work waiting for the database than it takes at once. Try again in a moment.",
      });
      return;
    }
    logger.error({ dbFailure, sqlState: err?.code, reason: err?.message ?? String(err) }, `database ${dbFailure}`);
    res.setHeader("Retry-After", "5");
    fail(
      503,
      dbFailure === "timeout"
        ? {
            code: "db_timeout",
            message:
              "The database took too long to answer, so this request could not be completed. Try again in a moment.",
          }
        : {
            code: "db_unavailable",
            message:
              "The database cannot be reached just now, so this request could not be completed. Try again in a moment.",
          },
    );
    return;
  }
  logger.error({ err }, "unexpected error");
  fail(500, {
    code: "internal",
    message: `Something went wrong on the server. It has been logged under reference ${requestId ?? "(none)"}.`,
  });
};
