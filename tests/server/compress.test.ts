import type { AddressInfo } from "node:net";
import { request, type Server } from "node:http";
import { brotliDecompressSync, gunzipSync } from "node:zlib";
import compression from "compression";
import express from "express";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { answerCompression, WHOLE_LIMIT } from "../../server/middleware/compress";

// Content codings of HTTP (RFC 9110 §8.4, §12.5.3): brotli (RFC 7932) and gzip (RFC 1952), decoded here by Node's
// zlib (the reference decoder) and compared with the JSON the route gave; negotiation as the `compression` package
// does it (brotli, then gzip, at equal q).
const small = { ok: true };
const page = { rows: Array.from({ length: 200 }, (_, i) => ({ id: i, title: `Verdigris on busbar ${i}` })) };
const large = { rows: Array.from({ length: 4000 }, (_, i) => ({ id: i, title: `Tracking on terminal ${i}` })) };
let server: Server;
let base: string;

beforeAll(async () => {
  const app = express();
  app.use(answerCompression((req, res) => !res.getHeader("Content-Disposition") && compression.filter(req, res)));
  app.get("/small", (_req, res) => res.json(small));
  app.get("/page", (_req, res) => res.json(page));
  app.get("/large", (_req, res) => res.json(large));
  app.get("/streamed", (_req, res) => {
    res.type("application/json");
    res.write(JSON.stringify(page).slice(0, 10));
    res.end(JSON.stringify(page).slice(10));
  });
  app.get("/download", (_req, res) => {
    res.attachment("defects.json");
    res.json(page);
  });
  app.get("/no-transform", (_req, res) => {
    res.set("Cache-Control", "no-store, no-transform");
    res.json(page);
  });
  server = app.listen(0, "127.0.0.1");
  await new Promise((r) => server.once("listening", r));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(() => new Promise((r) => server.close(r)));

function get(path: string, headers: Record<string, string> = {}, method = "GET") {
  return new Promise<{ status: number; headers: Record<string, string | string[] | undefined>; body: Buffer }>(
    (resolve, reject) => {
      const req = request(base + path, { headers, method }, (res) => {
        const chunks: Buffer[] = [];
        res.on("data", (c) => chunks.push(c));
        res.on("end", () => resolve({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks) }));
      });
      req.on("error", reject);
      req.end();
    },
  );
}

describe("answer compression", () => {
  it("a whole JSON answer goes out as brotli with its length, in one piece, to a browser that accepts it", async () => {
    const r = await get("/page", { "accept-encoding": "gzip, deflate, br" });
    expect(r.headers["content-encoding"]).toBe("br");
    expect(Number(r.headers["content-length"])).toBe(r.body.length);
    expect(r.headers["transfer-encoding"]).toBeUndefined();
    expect(r.headers.vary).toMatch(/Accept-Encoding/);
    expect(JSON.parse(brotliDecompressSync(r.body).toString())).toEqual(page);
    expect(r.body.length).toBeLessThan(JSON.stringify(page).length / 3);
  });

  it("gzip for a client that accepts only gzip, or prefers it by q-value", async () => {
    for (const accept of ["gzip", "br;q=0.5, gzip"]) {
      const r = await get("/page", { "accept-encoding": accept });
      expect(r.headers["content-encoding"]).toBe("gzip");
      expect(JSON.parse(gunzipSync(r.body).toString())).toEqual(page);
    }
  });

  it("raw for a client that asks for no encoding, and for answers under the 1 kB threshold", async () => {
    const none = await get("/page");
    expect(none.headers["content-encoding"]).toBeUndefined();
    expect(JSON.parse(none.body.toString())).toEqual(page);
    const tiny = await get("/small", { "accept-encoding": "br" });
    expect(tiny.headers["content-encoding"]).toBeUndefined();
    expect(JSON.parse(tiny.body.toString())).toEqual(small);
    const refused = await get("/page", { "accept-encoding": "identity, br;q=0" });
    expect(refused.headers["content-encoding"]).toBeUndefined();
  });

  it("an answer larger than the whole-answer limit, or written in parts, is still compressed (as a stream)", async () => {
    expect(JSON.stringify(large).length).toBeGreaterThan(WHOLE_LIMIT);
    for (const [path, want] of [
      ["/large", large],
      ["/streamed", page],
    ] as const) {
      const r = await get(path, { "accept-encoding": "gzip, deflate, br" });
      expect(r.headers["content-encoding"]).toBe("br");
      expect(r.headers["content-length"]).toBeUndefined();
      expect(JSON.parse(brotliDecompressSync(r.body).toString())).toEqual(want);
    }
  });

  it("downloads and answers marked no-transform go raw; a HEAD gets the headers alone", async () => {
    for (const path of ["/download", "/no-transform"]) {
      const r = await get(path, { "accept-encoding": "br" });
      expect(r.headers["content-encoding"]).toBeUndefined();
      expect(JSON.parse(r.body.toString())).toEqual(page);
    }
    const head = await get("/page", { "accept-encoding": "br" }, "HEAD");
    expect(head.status).toBe(200);
    expect(head.body.length).toBe(0);
  });
});
