/**
 * Request ids and request logs. Every request gets an id (or keeps the one a trusted
 * proxy sent in X-Request-Id), answers with it in `X-Request-Id`, carries it on every log
 * line written while it is answered (pino-http's `req.log`, and the plain `log` through
 * the AsyncLocalStorage in server/log.ts), and every API error body names it
 * (`error.requestId`), so a person can quote it and an operator can find the lines.
 */
import { randomFillSync } from "node:crypto";
import type { IncomingMessage, ServerResponse } from "node:http";
import type { RequestHandler } from "express";
import { pinoHttp } from "pino-http";
import { requestContext, type Logger } from "../log";

/** No 0/O, 1/l/i: easy to read out over a radio or copy from a phone. */
const ALPHABET = "23456789abcdefghjkmnpqrstuvwxyz";
const ID_LENGTH = 12;
/** Random bytes drawn ahead in one call and used up id by id (one system call per few hundred ids). */
const pool = Buffer.alloc(4096);
let poolAt = pool.length;
/**
 * Twelve characters of ALPHABET, each uniform: a byte is used only below 248 (8 × 31), then taken modulo 31,
 * so no character is likelier than another (rejection sampling, as `crypto.randomInt` does for one draw).
 */
export function newRequestId(): string {
  let id = "";
  while (id.length < ID_LENGTH) {
    if (poolAt === pool.length) {
      randomFillSync(pool);
      poolAt = 0;
    }
    const b = pool[poolAt++];
    if (b < 248) id += ALPHABET[b % ALPHABET.length];
  }
  return id;
}

/** What we accept from a proxy: short and plain, so it cannot forge log lines or headers. */
const SAFE_ID = /^[A-Za-z0-9._:-]{6,100}$/;

export function requestLogging(opts: { logger: Logger; trustProxy: boolean }): RequestHandler {
  const http = pinoHttp({
    logger: opts.logger,
    quietReqLogger: true, // req.log = logger.child({ reqId }): one short binding, not the whole request
    quietResLogger: true,
    genReqId(req: IncomingMessage, res: ServerResponse) {
      const given = req.headers["x-request-id"];
      const id = opts.trustProxy && typeof given === "string" && SAFE_ID.test(given) ? given : newRequestId();
      res.setHeader("X-Request-Id", id);
      return id;
    },
    customLogLevel: (_req, res, err) =>
      err || res.statusCode >= 500 ? "error" : res.statusCode >= 400 ? "warn" : "info",
    customSuccessMessage: (req, res, ms) => `${req.method} ${pathOf(req)} ${res.statusCode} ${ms} ms`,
    customErrorMessage: (req, res) => `${req.method} ${pathOf(req)} ${res.statusCode}`,
    customSuccessObject: (req, res, val) => ({ ...val, method: req.method, path: pathOf(req), status: res.statusCode }),
    customErrorObject: (req, res, _err, val) => ({
      ...val,
      method: req.method,
      path: pathOf(req),
      status: res.statusCode,
    }),
    // The request and response objects themselves are never logged (headers carry cookies), so they are not
    // serialized either: pino-http binds the request to a logger of its own on every request, and its standard
    // serializer, wrapped around ours, would copy every header each time only for ours to drop the copy.
    wrapSerializers: false,
    serializers: { req: () => undefined, res: () => undefined },
    // Health probes come every few seconds from every load balancer: not worth a line each.
    autoLogging: { ignore: (req) => pathOf(req).startsWith("/api/health") },
  });
  return (req, res, next) => {
    http(req, res);
    requestContext.run({ reqId: String(req.id) }, next);
  };
}

/** The path without its query string (tokens and filters stay out of the logs). */
const pathOf = (req: IncomingMessage) => ((req as { originalUrl?: string }).originalUrl ?? req.url ?? "").split("?")[0];
