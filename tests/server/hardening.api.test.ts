import { request } from "node:http";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, TEST_PASSWORD, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;

beforeAll(async () => {
  t = await createTestDb();
  const clientDir = mkdtempSync(join(tmpdir(), "tideline-client-"));
  writeFileSync(
    join(clientDir, "index.html"),
    '<!doctype html><div id="root"></div><script type="module" src="/assets/x.js"></script>',
  );
  server = await startTestServer({ db: t.db, clientDir, allowedHosts: ["tideline.example.org"] });
  fx = await makeCrew(t.db);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

/** A raw request: fetch will not let a test set Host. */
function raw(method: string, path: string, headers: Record<string, string>, body?: string) {
  const u = new URL(server.base);
  return new Promise<{ status: number; headers: Record<string, string | string[] | undefined>; body: string }>(
    (resolve, reject) => {
      const req = request({ host: u.hostname, port: u.port, method, path, headers }, (res) => {
        let data = "";
        res.setEncoding("utf8");
        res.on("data", (c) => (data += c));
        res.on("end", () => resolve({ status: res.statusCode!, headers: res.headers, body: data }));
      });
      req.on("error", reject);
      req.end(body);
    },
  );
}

describe("DNS rebinding: only Tideline's own host names are served", () => {
  it("when a foreign Host comes with a matching Origin, sign-in is refused with 421 and no session", async () => {
    const body = JSON.stringify({ email: fx.crew.curator.email, password: TEST_PASSWORD });
    const r = await raw(
      "POST",
      "/api/auth/sign-in",
      { host: "evil.example:80", origin: "http://evil.example", "content-type": "application/json" },
      body,
    );
    expect(r.status).toBe(421);
    expect(r.headers["set-cookie"]).toBeUndefined();
    expect(JSON.parse(r.body).error.code).toBe("unknown_host");
  });

  it("when a foreign Host asks for a page, it gets 421", async () => {
    expect((await raw("GET", "/", { host: "rebound.example" })).status).toBe(421);
  });

  it.each([["localhost:3000"], ["127.0.0.1"], ["[::1]:8080"], ["tideline.example.org"], ["TIDELINE.example.org:443"]])(
    "when the Host is %s, it is served",
    async (host) => {
      expect((await raw("GET", "/api/health", { host })).status).toBe(200);
    },
  );
});

describe("security headers (helmet)", () => {
  it("the page and the API carry CSP with frame-ancestors 'none', nosniff, Referrer-Policy and no inline scripts", async () => {
    for (const path of ["/", "/api/health"]) {
      const r = await server.client().get(path);
      const csp = r.headers.get("content-security-policy") ?? "";
      expect(csp).toContain("frame-ancestors 'none'");
      expect(csp).toMatch(/script-src 'self'(;|$)/);
      expect(csp).not.toContain("unsafe-eval");
      expect(r.headers.get("x-content-type-options")).toBe("nosniff");
      expect(r.headers.get("referrer-policy")).toBe("no-referrer");
      expect(r.headers.get("x-frame-options")).toBe("DENY");
      expect(r.headers.get("x-powered-by")).toBeNull();
    }
  });
});

describe("errors outside /api", () => {
  it("a malformed path (/%E0%A4%A) gets a plain 400 page with no stack and no file paths", async () => {
    const r = await raw("GET", "/%E0%A4%A", { host: "127.0.0.1" });
    expect(r.status).toBe(400);
    expect(r.headers["content-type"]).toMatch(/text\/html/);
    expect(r.body).not.toMatch(/ at |\/work\/|node_modules|URIError|Error:/);
  });

  it("a malformed API path gets JSON, not a stack", async () => {
    const r = await raw("GET", "/api/sites/%E0%A4%A", { host: "127.0.0.1" });
    expect(r.status).toBeGreaterThanOrEqual(400);
    expect(r.status).toBeLessThan(500);
    expect(r.body).not.toMatch(/ at |\/work\/|node_modules/);
  });
});
