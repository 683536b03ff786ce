import { expect, test } from "@playwright/test";
import { readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { signIn } from "./support/auth";

// The built client under the server's Content-Security-Policy (helmet): no inline-script
// exception is needed, so nothing the pages do may be blocked.
test("the built client runs under the CSP: no violations while signing in and opening the main pages", async ({
  page,
}) => {
  const violations: string[] = [];
  page.on("console", (m) => {
    if (/Content Security Policy/i.test(m.text())) violations.push(m.text());
  });
  await page.addInitScript(() => {
    document.addEventListener("securitypolicyviolation", (e) =>
      console.error(`Content Security Policy violation: ${e.violatedDirective} ${e.blockedURI}`),
    );
  });
  const first = await page.goto("/sign-in");
  const csp = first!.headers()["content-security-policy"] ?? "";
  expect(csp).toContain("script-src 'self'");
  expect(csp).toContain("frame-ancestors 'none'");
  expect(first!.headers()["x-content-type-options"]).toBe("nosniff");

  await signIn(page, "curator");
  for (const name of ["Boards", "Defects", "Photos"]) {
    const link = page.getByRole("link", { name, exact: true }).first();
    if (await link.count()) {
      await link.click();
      // Not "networkidle": the offline probe keeps asking, so the network is never idle. Wait
      // for the page's heading and until nothing on it says it is still loading.
      await expect(page.getByRole("heading", { level: 1 }).first()).toBeVisible();
      await expect(page.locator('[aria-busy="true"], [role="status"]:has-text("…")')).toHaveCount(0);
    }
  }
  expect(violations).toEqual([]);
});

test("too many wrong passwords: the sign-in form says plainly how long to wait", async ({ page }) => {
  const email = `nobody-${Date.now()}@tideline.test`;
  await page.goto("/sign-in");
  for (let i = 0; i < 11; i++) {
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect(page.getByRole("alert")).toBeVisible();
  }
  await expect(page.getByRole("alert")).toContainText(
    /Too many failed sign-ins for this account\. Try again in \d+ minutes?\./,
  );
});

// The build writes each script and style beside itself compressed (vite.config.ts); the server sends those bytes.
test("the built client's scripts and styles travel as the build compressed them", async ({ request }) => {
  const html = await (await request.get("/")).text();
  const assets = [...html.matchAll(/(?:src|href)="(\/assets\/[^"]+\.(?:js|css))"/g)].map((m) => m[1]);
  expect(assets.length).toBeGreaterThan(1);
  // Files under 1 KiB are left as they are (the build's threshold, and the server's for compressing an answer).
  const compressed = assets.filter((path) => statSync(join("dist/client", path)).size >= 1024);
  expect(compressed.some((path) => /\/index-[^/]+\.js$/.test(path))).toBe(true);
  for (const path of compressed) {
    const onDisk = readFileSync(join("dist/client", `${path}.br`));
    const r = await request.get(path, { headers: { "accept-encoding": "br" } });
    expect(r.status()).toBe(200);
    expect(r.headers()["content-encoding"]).toBe("br");
    expect(Number(r.headers()["content-length"])).toBe(onDisk.length);
    expect(r.headers()["cache-control"]).toBe("public, max-age=31536000, immutable");
  }
});
