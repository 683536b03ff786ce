import type { ErrorRequestHandler } from "express";
import { ZodError } from "zod";
import { dbFailureOf } from "../db-errors";
import { AppError } from "../errors";
import { mapPgError } from "./pg-errors";

function zodFields(err: ZodError): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.join(".") : "_";
    fields[key] ??= issue.message;
  }
  return fields;
}

/** Every error leaves as `{"error":{"code","message","fields?"}}`; no stack ever reaches the client. */
export const errorHandler: ErrorRequestHandler = (err, _req, res, _next) => {
  if (res.headersSent) {
    // Half a file must not look like a whole one: cut the connection so the download fails.
    console.error(
      "[api] error after response started:",
      dbFailureOf(err) ? `database ${dbFailureOf(err)}: ${err?.message}` : err,
    );
    res.destroy();
    return;
  }
  if (err instanceof ZodError) {
    const fields = zodFields(err);
    const first = Object.entries(fields)[0];
    res.status(400).json({
      error: {
        code: "invalid_input",
        message: first ? `Check ${first[0] === "_" ? "the request" : first[0]}: ${first[1]}` : "Invalid input.",
        fields,
      },
    });
    return;
  }
  if (err instanceof AppError) {
    const body: Record<string, unknown> = { code: err.code, message: err.message };
    if (err.fields) body.fields = err.fields;
    if (err.details !== undefined) body.current = err.details;
    if (err.headers) res.set(err.headers);
    res.status(err.status).json({ error: body });
    return;
  }
  const pg = mapPgError(err);
  if (pg) {
    console.warn(`[api] database refused input (${(err as { code: string }).code}): ${(err as Error).message}`);
    res.status(pg.status).json({ error: { code: pg.code, message: pg.message } });
    return;
  }
  // body-parser and multer errors carry a status or a code of their own.
  const status =
    typeof err?.status === "number" ? err.status : typeof err?.statusCode === "number" ? err.statusCode : 500;
  if (status === 413 || err?.code === "LIMIT_FILE_SIZE") {
    res.status(413).json({ error: { code: "too_large", message: "That is larger than Tideline accepts." } });
    return;
  }
  if (status >= 400 && status < 500) {
    const message =
      err?.type === "entity.parse.failed" ? "The request body is not valid JSON." : "The request could not be read.";
    res.status(status).json({ error: { code: "bad_request", message } });
    return;
  }
  const dbFailure = dbFailureOf(err);
  if (dbFailure) {
    // The database went away or is overloaded: this request fails, the process and the pool carry on.
    console.error(`[api] database ${dbFailure}: ${err?.code ? `${err.code} ` : ""}${err?.message ?? err}`);
    res.setHeader("Retry-After", "5");
    res.status(503).json({
      error:
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
    });
    return;
  }
  console.error("[api] unexpected error:", err);
  res
    .status(500)
    .json({ error: { code: "internal", message: "Something went wrong on the server. It has been logged." } });
};
