import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from "node:fs";
import { request } from "node:http";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { brotliCompressSync, brotliDecompressSync, constants, gzipSync, gunzipSync } from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { startTestServer, type TestServer } from "../helpers/http";

// Responses are compressed (gzip via the `compression` middleware, HTTP/1.1 RFC 9110
// content coding), content-hashed assets are cached as immutable (RFC 8246) and index.html is
// revalidated, so a new build shows at once.
let t: TestDb;
let server: TestServer;
let dir: string;
const script = `export const tideline = ${JSON.stringify("x".repeat(4000))};\n`;
const brBest = brotliCompressSync(script, { params: { [constants.BROTLI_PARAM_QUALITY]: 11 } });
const gzBest = gzipSync(script, { level: 9 });

beforeAll(async () => {
  t = await createTestDb();
  dir = mkdtempSync(join(tmpdir(), "tideline-client-"));
  mkdirSync(join(dir, "assets"));
  writeFileSync(join(dir, "assets", "index-AbC123xy.js"), script);
  writeFileSync(join(dir, "index.html"), "<!doctype html><title>Tideline</title>");
  // As the build writes them (vite-plugin-compression2 in vite.config.ts): the asset, and beside it its brotli and
  // gzip copies, compressed at their best once.
  writeFileSync(join(dir, "assets", "board-Zz9Yx8wv.js"), script);
  writeFileSync(join(dir, "assets", "board-Zz9Yx8wv.js.br"), brBest);
  writeFileSync(join(dir, "assets", "board-Zz9Yx8wv.js.gz"), gzBest);
  server = await startTestServer({ db: t.db, clientDir: dir });
});
afterAll(async () => {
  await server.close();
  await t.drop();
  rmSync(dir, { recursive: true, force: true });
});

/** A raw GET (fetch would undo the gzip and hide it). */
function get(path: string, headers: Record<string, string> = {}) {
  return new Promise<{ status: number; headers: Record<string, string | string[] | undefined>; body: Buffer }>(
    (resolve, reject) => {
      const req = request(server.base + path, { headers }, (res) => {
        const chunks: Buffer[] = [];
        res.on("data", (c) => chunks.push(c));
        res.on("end", () => resolve({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks) }));
      });
      req.on("error", reject);
      req.end();
    },
  );
}

describe("compression and caching", () => {
  it("a hashed asset is gzipped for a browser that accepts it, and cached for a year as immutable", async () => {
    const r = await get("/assets/index-AbC123xy.js", { "accept-encoding": "gzip" });
    expect(r.status).toBe(200);
    expect(r.headers["content-encoding"]).toBe("gzip");
    expect(gunzipSync(r.body).toString()).toBe(script);
    expect(r.body.length).toBeLessThan(script.length / 10);
    expect(r.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
  });

  it("a browser that accepts brotli gets brotli", async () => {
    const r = await get("/assets/index-AbC123xy.js", { "accept-encoding": "gzip, deflate, br" });
    expect(r.headers["content-encoding"]).toBe("br");
    expect(brotliDecompressSync(r.body).toString()).toBe(script);
  });

  it("an asset the build compressed is sent as those bytes: brotli, else gzip, else the file itself", async () => {
    const br = await get("/assets/board-Zz9Yx8wv.js", { "accept-encoding": "gzip, deflate, br" });
    expect(br.status).toBe(200);
    expect(br.headers["content-encoding"]).toBe("br");
    expect(br.body.equals(brBest)).toBe(true);
    expect(brotliDecompressSync(br.body).toString()).toBe(script);
    expect(br.headers["content-length"]).toBe(String(brBest.length));
    expect(br.headers["content-type"]).toMatch(/^text\/javascript/);
    expect(br.headers["vary"]).toMatch(/accept-encoding/i);
    expect(br.headers["cache-control"]).toBe("public, max-age=31536000, immutable");

    const gz = await get("/assets/board-Zz9Yx8wv.js", { "accept-encoding": "gzip" });
    expect(gz.headers["content-encoding"]).toBe("gzip");
    expect(gz.body.equals(gzBest)).toBe(true);
    expect(gz.headers["cache-control"]).toBe("public, max-age=31536000, immutable");

    const plain = await get("/assets/board-Zz9Yx8wv.js");
    expect(plain.headers["content-encoding"]).toBeUndefined();
    expect(plain.body.toString()).toBe(script);
    expect(plain.headers["content-type"]).toMatch(/^text\/javascript/);
  });

  it("index.html and the client's routes are revalidated every time", async () => {
    for (const path of ["/", "/sites/x/parts"]) {
      const r = await get(path);
      expect(r.status).toBe(200);
      expect(r.headers["cache-control"]).toBe("no-cache");
    }
  });

  it("a missing asset is a 404, never index.html cached for a year", async () => {
    const r = await get("/assets/gone-123.js");
    expect(r.status).toBe(404);
  });

  it("API answers stay uncached (no-store)", async () => {
    const r = await get("/api/health", { "accept-encoding": "gzip" });
    expect(r.headers["cache-control"]).toBe("no-store");
  });
});
