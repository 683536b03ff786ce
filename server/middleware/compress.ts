/**
 * Compression of answers. `compression` (the package) compresses every answer as a stream on libuv's thread pool:
 * right for files and long answers, but a whole JSON answer of a few kB then waits for two round trips to the pool
 * (the body, then the stream's end) and goes out as several chunked writes. An answer that is already whole when
 * `res.end` gets it (what `res.json`/`res.send` hand over) and is no larger than WHOLE_LIMIT is compressed here in
 * one synchronous call instead and sent with its Content-Length in one write; anything else (streams, downloads,
 * larger answers) falls through to `compression` as before. Same negotiation (`negotiator`, the library
 * `compression` uses, with brotli then gzip preferred), same filter and threshold, so a client gets the same encoding
 * from either path; the whole-answer path's brotli runs at quality 2 rather than the stream's 4 (below). Measured in
 * DEVELOPERS.md "Whole answers compressed in one call" and "Server CPU per request, profiled".
 */
import compression from "compression";
import type { Request, RequestHandler, Response } from "express";
import Negotiator from "negotiator";
import { brotliCompressSync, constants, deflateSync, gzipSync } from "node:zlib";

/** Below this an answer goes raw (compression's default threshold: probes, `{ok:true}`, small errors). */
export const COMPRESS_THRESHOLD = 1024;
/**
 * Largest whole answer compressed on the event loop: brotli at quality 2 costs under 0.1 ms for a 25 kB register
 * page and well under 1 ms at this size (measured on this machine), a bounded block; larger answers (a board's page
 * of tiles, 226–333 kB) are compressed off the loop by `compression`'s stream, at its default quality 4.
 */
export const WHOLE_LIMIT = 128 * 1024;
/**
 * Brotli quality 2 for whole answers on the loop. Against `compression`'s default 4 it takes less than half the CPU
 * (register page 0.17 → 0.07 ms, board list 0.18 → 0.10 ms alone; in the server's CPU profile zlib fell from 9 % to
 * 3 % of its busy time) for 0–5 % more bytes (register 3.9 → 4.1 kB, overview 3.2 → 3.2, board list 4.2 → 4.3),
 * still fewer than gzip's at its default level 6 (DEVELOPERS.md "Server CPU per request, profiled").
 */
const BROTLI = { params: { [constants.BROTLI_PARAM_QUALITY]: 2 } };
const ENCODINGS = ["br", "gzip", "deflate", "identity"];
const PREFERRED = ["br", "gzip"];

type Filter = (req: Request, res: Response) => boolean;

const noTransform = (res: Response) =>
  /(?:^|,)\s*no-transform\s*(?:,|$)/i.test(String(res.getHeader("Cache-Control") ?? ""));

/** The encoding for this request, as `compression` chooses it (identity when the client asked for none). */
export function chooseEncoding(req: Request): string {
  if (!req.headers["accept-encoding"]) return "identity";
  return new Negotiator(req).encoding(ENCODINGS, { preferred: PREFERRED }) ?? "identity";
}

function compressWhole(filter: Filter): RequestHandler {
  return (req, res, next) => {
    const end = res.end;
    // Patched after `compression` patched it, so this runs first and hands `compression` either the compressed
    // body with its Content-Encoding (which it then leaves alone: "already encoded") or the call untouched.
    res.end = function (this: Response, ...args: unknown[]) {
      res.end = end;
      const [chunk, encoding] = args;
      if (
        !res.headersSent &&
        req.method !== "HEAD" &&
        (typeof chunk === "string" || Buffer.isBuffer(chunk)) &&
        typeof args[args.length - 1] !== "function"
      ) {
        const body =
          typeof chunk === "string"
            ? Buffer.from(chunk, typeof encoding === "string" ? (encoding as BufferEncoding) : "utf8")
            : chunk;
        if (
          body.length >= COMPRESS_THRESHOLD &&
          body.length <= WHOLE_LIMIT &&
          !res.getHeader("Content-Encoding") &&
          filter(req, res) &&
          !noTransform(res)
        ) {
          res.vary("Accept-Encoding");
          const method = chooseEncoding(req);
          if (method === "br" || method === "gzip" || method === "deflate") {
            const out =
              method === "br"
                ? brotliCompressSync(body, BROTLI)
                : method === "gzip"
                  ? gzipSync(body)
                  : deflateSync(body);
            res.setHeader("Content-Encoding", method);
            res.setHeader("Content-Length", out.length);
            return (end as (...a: unknown[]) => Response).call(this, out);
          }
        }
      }
      return (end as (...a: unknown[]) => Response).apply(this, args);
    } as Response["end"];
    next();
  };
}

/**
 * Both paths, in the order they must be mounted: `compression` for streams and large answers, then the whole-answer
 * path in front of it. `filter` decides what may be compressed at all (the app leaves downloads alone).
 */
export function answerCompression(filter: Filter): RequestHandler[] {
  return [compression({ filter, threshold: COMPRESS_THRESHOLD }), compressWhole(filter)];
}
