/**
 * The one logger: pino, JSON lines on stdout (one object per line, what log shippers
 * read). Every line written while a request is being answered carries that request's id
 * (`reqId`), whether it comes from `req.log` (pino-http, server/observability/http.ts) or
 * from this module's `log` deep inside a service: the id travels in an AsyncLocalStorage.
 * Jobs get a child logger with the job's name and id. LOG_LEVEL sets the level (default
 * info; under vitest error, so test output stays readable).
 */
import { AsyncLocalStorage } from "node:async_hooks";
import pino from "pino";

/** What belongs to the request being answered (set by server/observability/http.ts). */
export const requestContext = new AsyncLocalStorage<{ reqId: string }>();

/** The request id of the request being answered here, if any. */
export const currentRequestId = () => requestContext.getStore()?.reqId;

export function createLogger(opts: { level?: string } = {}, destination?: pino.DestinationStream) {
  return pino(
    {
      level: opts.level ?? process.env.LOG_LEVEL ?? (process.env.VITEST ? "error" : "info"),
      base: { service: "tideline", pid: process.pid },
      timestamp: pino.stdTimeFunctions.isoTime,
      // A line logged through the plain logger during a request gets the request's id; a
      // request's own child logger (req.log) already has it bound, so it is not repeated.
      mixin(_obj, _level, logger) {
        const reqId = currentRequestId();
        return reqId && !(logger as pino.Logger).bindings().reqId ? { reqId } : {};
      },
      redact: {
        paths: ["req.headers.cookie", "req.headers.authorization", 'res.headers["set-cookie"]'],
        censor: "[redacted]",
      },
    },
    destination,
  );
}

export const log = createLogger();

export type Logger = pino.Logger;
