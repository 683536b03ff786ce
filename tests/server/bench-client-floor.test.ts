/**
 * The bench's client floor (server/bench/paint.ts `writeFloorPage`, src/bench-floor.ts): built by Vite into a client
 * folder beside a built index.html, served, and opened in Debian's chromium, it shows the static page's heading
 * rendered by React; its page takes the app's head without the app's scripts; the remover leaves the folder as it was.
 */
import {
  createReadStream,
  existsSync,
  mkdirSync,
  mkdtempSync,
  readdirSync,
  readFileSync,
  rmSync,
  writeFileSync,
} from "node:fs";
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import { extname, join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { FLOOR_PAGE, openBrowser, writeFloorPage } from "../../server/bench/paint";

let dir: string;
let server: Server;
let base: string;
let remove: () => void;
const TYPES: Record<string, string> = { ".html": "text/html", ".js": "text/javascript", ".css": "text/css" };

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "client-floor-test-"));
  mkdirSync(join(dir, "assets"));
  writeFileSync(join(dir, "assets", "app.css"), "h1 { color: rgb(1, 2, 3); }");
  writeFileSync(join(dir, "assets", "app.js"), "document.title = 'the app ran';");
  writeFileSync(
    join(dir, "index.html"),
    `<!doctype html>
<html lang="en">
  <head>
    <title>Tideline</title>
    <script type="module" crossorigin src="/assets/app.js"></script>
    <link rel="modulepreload" crossorigin href="/assets/app.js">
    <link rel="stylesheet" crossorigin href="/assets/app.css">
  </head>
  <body><div id="root"></div></body>
</html>`,
  );
  remove = await writeFloorPage(dir);
  server = createServer((req, res) => {
    const file = join(dir, (req.url ?? "/").split("?")[0]);
    if (!existsSync(file)) return void res.writeHead(404).end();
    res.writeHead(200, { "content-type": TYPES[extname(file)] ?? "application/octet-stream" });
    createReadStream(file).pipe(res);
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
}, 120_000);

afterAll(async () => {
  await new Promise((r) => server?.close(r));
  rmSync(dir, { recursive: true, force: true });
});

describe("the bench's client floor", () => {
  it("is the app's head with its own script instead of the app's, and React draws the static page's heading", async () => {
    const html = readFileSync(join(dir, FLOOR_PAGE), "utf8");
    expect(html).toContain('href="/assets/app.css"');
    expect(html).not.toContain("/assets/app.js");
    const script = /src="\/assets\/(bench-floor-[^"]+\.js)"/.exec(html)?.[1];
    expect(script).toBeTruthy();
    const browser = await openBrowser();
    try {
      const page = await browser.newPage();
      const errors: string[] = [];
      page.on("pageerror", (e) => errors.push(String(e)));
      await page.goto(`${base}/${FLOOR_PAGE}`);
      await expect.poll(() => page.locator("h1").textContent(), { timeout: 20_000 }).toBe("Board 001 — Hull 2, deck 2");
      // A string: it runs in the page, which this config's types (no DOM) do not describe.
      expect(await page.evaluate('getComputedStyle(document.querySelector("h1")).color')).toBe("rgb(1, 2, 3)");
      expect(await page.title()).toBe("Tideline"); // the app's own script did not run
      expect(errors).toEqual([]);
    } finally {
      await browser.close();
    }
  }, 60_000);

  it("the remover takes the page and its scripts away, leaving the app's files", () => {
    remove();
    expect(existsSync(join(dir, FLOOR_PAGE))).toBe(false);
    expect(readdirSync(join(dir, "assets")).sort()).toEqual(["app.css", "app.js"]);
  });
});
