/**
 * The one logger: pino, JSON lines on stdout (one object per line, what log shippers
 * read). Requests get a child logger with their request id from pino-http
 * (server/observability/http.ts); jobs get one with the job's name and id.
 * LOG_LEVEL sets the level (default info; under vitest error, so test output stays readable).
 */
import pino from "pino";

export const log = pino({
  level: process.env.LOG_LEVEL ?? (process.env.VITEST ? "error" : "info"),
  base: { service: "tideline", pid: process.pid },
  timestamp: pino.stdTimeFunctions.isoTime,
  redact: {
    paths: ["req.headers.cookie", "req.headers.authorization", 'res.headers["set-cookie"]'],
    censor: "[redacted]",
  },
});

export type Logger = typeof log;
