/**
 * The bench's "bare HTTP" side: the least an HTTP endpoint on Node could cost for the same work. For each
 * captured path it replays that path's statements with the bare `pg` driver (as the raw side does), then
 * stringifies the endpoint's own answer (parsed once at start) and sends it with node:http alone — no
 * Express, no session logic, no logging, no validation — compressed as the server compresses a whole answer
 * (brotli quality 2, else gzip, above the same 1 kB threshold) when the client asks for it. Run by
 * `server/cli/bench.ts` as its own process, as the server is:
 *   node --import tsx server/bench/floor-server.ts <plans.json>   (DATABASE_URL, FLOOR_POOL_MAX; prints its port)
 * So endpoint ÷ bare HTTP is what Tideline adds over Node's HTTP, and bare HTTP ÷ raw what HTTP itself adds.
 */
import { readFileSync } from "node:fs";
import { createServer } from "node:http";
import { brotliCompressSync, constants, gzipSync } from "node:zlib";
import pg from "pg";
import { replay, type Replay } from "./replay";

export interface FloorPath {
  plan: Replay;
  /** The endpoint's answer, as JSON text. */
  body: string;
}

const THRESHOLD = 1024; // compression's default threshold, as server/middleware/compress.ts
const BROTLI = { params: { [constants.BROTLI_PARAM_QUALITY]: 2 } };

const plans = JSON.parse(readFileSync(process.argv[2], "utf8")) as Record<string, FloorPath>;
const answers = new Map(Object.entries(plans).map(([path, p]) => [path, { plan: p.plan, value: JSON.parse(p.body) }]));
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: Number(process.env.FLOOR_POOL_MAX ?? 4) });

const server = createServer((req, res) => {
  const found = answers.get(req.url ?? "");
  if (!found) {
    res.writeHead(404).end();
    return;
  }
  replay(pool, found.plan).then(
    () => {
      const text = Buffer.from(JSON.stringify(found.value));
      const accept = String(req.headers["accept-encoding"] ?? "");
      const headers: Record<string, string | number> = { "content-type": "application/json; charset=utf-8" };
      let body = text;
      if (text.length >= THRESHOLD && /\bbr\b/.test(accept)) {
        body = brotliCompressSync(text, BROTLI);
        headers["content-encoding"] = "br";
      } else if (text.length >= THRESHOLD && /\bgzip\b/.test(accept)) {
        body = gzipSync(text);
        headers["content-encoding"] = "gzip";
      }
      headers["content-length"] = body.length;
      res.writeHead(200, headers).end(body);
    },
    (e: Error) => res.writeHead(500, { "content-type": "text/plain" }).end(e.message),
  );
});
server.keepAliveTimeout = 65_000;
server.listen(0, "127.0.0.1", () => {
  const a = server.address();
  console.log(`listening ${typeof a === "object" && a ? a.port : 0}`);
});
process.on("SIGTERM", () => {
  server.closeAllConnections();
  server.close();
  void pool.end().then(() => process.exit(0));
});
