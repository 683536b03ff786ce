/**
 * Uploads on their way to disk (server/photos/upload.ts, its multer storage engine): a file larger
 * than the engine's buffers arrives byte for byte in a temporary file; a client that goes away in the
 * middle of a file, and a request refused for its file count, leave nothing in the temporary folder.
 */
import express from "express";
import { randomBytes } from "node:crypto";
import { mkdtemp, readdir, readFile, rm } from "node:fs/promises";
import { request, type Server } from "node:http";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";

let dir: string;
let server: Server;
let port: number;
const seen: Array<{ size: number; same: boolean }> = [];
const sent = randomBytes(5 * 1024 * 1024 + 123); // past both 1 MiB buffers, not a multiple of a chunk

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), "tideline-upload-temp-"));
  process.env.UPLOAD_TMP_DIR = dir; // read when the module loads
  const { receiveFiles, removeTemporary } = await import("../../server/photos/upload");
  const app = express();
  app.post("/up", receiveFiles, async (req, res) => {
    const files = req.files as Express.Multer.File[];
    for (const f of files) seen.push({ size: f.size, same: (await readFile(f.path)).equals(sent) });
    await removeTemporary(files);
    res.json({ n: files.length });
  });
  app.use((err: { status?: number }, _req: express.Request, res: express.Response, _next: express.NextFunction) => {
    res.status(err.status ?? 500).json({});
  });
  await new Promise<void>((resolve) => {
    server = app.listen(0, "127.0.0.1", () => resolve());
  });
  port = (server.address() as { port: number }).port;
});
afterAll(async () => {
  server.close();
  await rm(dir, { recursive: true, force: true });
});

const boundary = "----tideline-upload-test";
const part = (name: string, bytes: Buffer) =>
  Buffer.concat([
    Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="${name}"\r\nContent-Type: image/jpeg\r\n\r\n`,
    ),
    bytes,
    Buffer.from("\r\n"),
  ]);
const end = Buffer.from(`--${boundary}--\r\n`);

function post(body: Buffer, opts: { cutAfter?: number } = {}) {
  return new Promise<number>((resolve, reject) => {
    const req = request(
      {
        host: "127.0.0.1",
        port,
        path: "/up",
        method: "POST",
        headers: { "content-type": `multipart/form-data; boundary=${boundary}`, "content-length": body.length },
      },
      (res) => {
        res.resume();
        res.on("end", () => resolve(res.statusCode ?? 0));
      },
    );
    req.on("error", () => resolve(0));
    if (opts.cutAfter === undefined) return void req.end(body);
    // Half a file, then the client is gone (a phone losing its signal).
    req.write(body.subarray(0, opts.cutAfter), () => setTimeout(() => req.destroy(), 50));
    req.on("close", () => resolve(-1));
    void reject;
  });
}

/** The temporary folder, once every write and removal has had time to finish. */
async function leftInTemp() {
  for (let i = 0; i < 40; i++) {
    const names = await readdir(dir);
    if (!names.length) return names;
    await new Promise((r) => setTimeout(r, 50));
  }
  return readdir(dir);
}

describe("uploads on their way to disk", () => {
  it("a file larger than the buffers arrives byte for byte, and the route's removal leaves nothing", async () => {
    expect(await post(Buffer.concat([part("big.jpg", sent), end]))).toBe(200);
    expect(seen).toEqual([{ size: sent.length, same: true }]);
    expect(await leftInTemp()).toEqual([]);
  });

  it("a client gone in the middle of a file leaves no temporary file", async () => {
    const body = Buffer.concat([part("a.jpg", sent), part("b.jpg", sent), end]);
    await post(body, { cutAfter: Math.floor(sent.length * 1.5) }); // the first file whole, the second half
    expect(await leftInTemp()).toEqual([]);
  });

  it("a request over the file count is refused (413) and leaves no temporary file", async () => {
    const small = randomBytes(300 * 1024);
    const body = Buffer.concat([...Array.from({ length: 21 }, (_, i) => part(`p${i}.jpg`, small)), end]);
    expect(await post(body)).toBe(413);
    expect(await leftInTemp()).toEqual([]);
  });
});
