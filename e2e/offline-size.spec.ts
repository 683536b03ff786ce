import { expect, request, test, type Page } from "@playwright/test";
import { mkdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { gzipSync } from "node:zlib";
import { DEMO_PASSWORD, signIn } from "./support/auth";
import { expectPageKept, keptQueryKeys, untilControlled } from "./support/offline";

/**
 * What the field app stores on a phone, measured, not estimated.
 * - The precache: the Workbox manifest that vite-plugin-pwa wrote into the build's sw.js (what the
 *   worker fetches at install), summed from the built files, and what the browser's Cache Storage
 *   holds once the worker is active.
 * - The kept reads for a 500-position board: a board of 500 positions with nameplates (one CSV import)
 *   and an inspection on each, opened on a 360 px phone (its drawing and its readings page); the
 *   IndexedDB entry of src/app/persist.ts, its length and the biggest reads in it.
 * The figures go to the test's annotations and to .data/test-results/offline-sizes.json; DEVELOPERS.md
 * quotes them. The bound (src/app/persist.ts MAX_BYTES, 8 MiB) is asserted to hold for such a board.
 * Then: sign-out leaves none of the person's reads on the phone, and a copy past its age (3 days) is
 * not shown.
 */
const MAX_BYTES = 8 * 1024 * 1024; // src/app/persist.ts (e2e does not import client code)
const MAX_AGE_MS = 3 * 24 * 3600_000;
const CLIENT = join(process.cwd(), "dist", "client");

/** The precache list vite-plugin-pwa wrote into sw.js, with each file's size as built and gzipped. */
function precacheManifest() {
  const sw = readFileSync(join(CLIENT, "sw.js"), "utf8");
  // An icon named both by includeAssets and by the glob is listed twice; the worker caches each URL once.
  const urls = [...new Set([...sw.matchAll(/\{url:"([^"]+)",revision:/g)].map((m) => m[1]))];
  let bytes = 0;
  let gzip = 0;
  let fonts = 0;
  for (const u of urls) {
    const file = join(CLIENT, u);
    bytes += statSync(file).size;
    gzip += gzipSync(readFileSync(file)).length;
    if (u.endsWith(".woff2")) fonts += statSync(file).size;
  }
  return { entries: urls.length, bytes, gzipBytes: gzip, fontBytes: fonts };
}

/** What the page's Cache Storage holds (the worker's precache and anything else it cached). */
function cacheStorage(page: Page) {
  return page.evaluate(async () => {
    let entries = 0;
    let bytes = 0;
    for (const name of await caches.keys()) {
      const c = await caches.open(name);
      for (const req of await c.keys()) {
        const res = await c.match(req);
        entries += 1;
        bytes += res ? (await res.blob()).size : 0;
      }
    }
    return { entries, bytes };
  });
}

/** The kept reads' IndexedDB entry: its length in UTF-16 code units and UTF-8 bytes, and its biggest reads. */
function keptEntry(page: Page) {
  return page.evaluate(
    () =>
      new Promise<{ chars: number; utf8: number; queries: number; biggest: Array<{ key: string; chars: number }> }>(
        (resolve, reject) => {
          const open = indexedDB.open("tideline-cache");
          open.onerror = () => reject(open.error);
          open.onsuccess = () => {
            const get = open.result
              .transaction("queries", "readonly")
              .objectStore("queries")
              .get("tideline-query-cache");
            get.onsuccess = () => {
              const raw = (get.result as string | undefined) ?? "";
              const c = raw ? (JSON.parse(raw) as { clientState: { queries: Array<{ queryKey: unknown[] }> } }) : null;
              const sizes = (c?.clientState.queries ?? []).map((q) => ({
                key: JSON.stringify(q.queryKey),
                chars: JSON.stringify(q).length,
              }));
              sizes.sort((a, b) => b.chars - a.chars);
              resolve({
                chars: raw.length,
                utf8: new TextEncoder().encode(raw).length,
                queries: sizes.length,
                biggest: sizes.slice(0, 4),
              });
            };
            get.onerror = () => reject(get.error);
          };
        },
      ),
  );
}

const kib = (n: number) => `${(n / 1024).toFixed(1)} KiB`;

test.describe("what the phone keeps, on a 360 px phone", () => {
  test.setTimeout(420_000);
  test.use({ viewport: { width: 360, height: 740 } });

  test("the precache and the kept reads of a 500-position board, measured within the bound; sign-out clears them; a copy past its age is not shown", async ({
    page,
    context,
    baseURL,
  }) => {
    const curator = await request.newContext({ baseURL, extraHTTPHeaders: { Origin: baseURL! } });
    expect(
      (
        await curator.post("/api/auth/sign-in", { data: { email: "curator@tideline.test", password: DEMO_PASSWORD } })
      ).ok(),
    ).toBeTruthy();
    const siteId = ((await (await curator.get("/api/sites")).json()) as { sites: Array<{ id: string }> }).sites[0].id;

    // 500 positions with their nameplates in one import: 20 rows × 25 columns, four sections, breakers and meters.
    const name = `Measured board ${Date.now().toString(36)}`;
    const lines = [
      "board,section,designation,kind,grid_row,grid_col,circuit,maker,model,rating_amps,poles,year,serial",
    ];
    for (let r = 1; r <= 20; r++)
      for (let c = 1; c <= 25; c++) {
        const meter = c === 25;
        lines.push(
          [
            name,
            `Section ${Math.ceil(r / 5)}`,
            `R${r}C${c}`, // not the demo boards' "4-7": a photo named for 4-7 must still find one position
            meter ? "meter" : "molded_case_breaker",
            r,
            c,
            `Feeder ${r}-${c} (aux machinery deck ${1 + (c % 4)})`,
            meter ? "Calloway Instrument Works" : "Harwick & Sons Electrical",
            meter ? "CIW-4 switchboard ammeter" : `HS-${100 + 25 * (c % 6)} moulded case`,
            meter ? "" : 15 * (1 + (c % 8)),
            meter ? "" : 3,
            1941 + (r % 9),
            `S${r}${c}-${(r * 7919 + c * 104729) % 100000}`,
          ].join(","),
        );
      }
    const imported = await curator.post(`/api/sites/${siteId}/inventory/import?mode=commit`, {
      headers: { "content-type": "text/csv" },
      data: lines.join("\r\n") + "\r\n",
    });
    expect(imported.status(), (await imported.text()).slice(0, 600)).toBe(201);
    const boards = (await (await curator.get(`/api/sites/${siteId}/boards`)).json()) as Array<{
      id: string;
      name: string;
    }>;
    const boardId = boards.find((b) => b.name === name)!.id;
    const board = (await (await curator.get(`/api/sites/${siteId}/boards/${boardId}`)).json()) as {
      positions: Array<{ component: { id: string } | null }>;
    };
    expect(board.positions).toHaveLength(500);

    // A surveyed board: one inspection per position, sent a few at a time.
    const ids = board.positions.map((p) => p.component!.id);
    for (let i = 0; i < ids.length; i += 10)
      await Promise.all(
        ids.slice(i, i + 10).map(async (id, j) => {
          const r = await curator.post(`/api/sites/${siteId}/components/${id}/inspections`, {
            data: {
              percentRusted: [0.03, 0.3, 1, 3, 10][(i + j) % 5],
              belowWaterLine: (i + j) % 3 === 0,
              contaminants: (i + j) % 2 ? ["silt"] : ["silt", "salt_crust"],
              mechanism: "free",
              insulation: "intact",
              notes: "Tide mark at the lower terminals; arc chutes dry.",
            },
          });
          expect(r.status()).toBe(201);
        }),
      );
    await curator.dispose();

    await signIn(page, "volunteer");
    await page.goto(`/sites/${siteId}/boards/${boardId}`);
    await expect(page.getByRole("heading", { name })).toBeVisible();
    await expectPageKept(page);
    await page.goto(`/sites/${siteId}/readings/boards/${boardId}`);
    await expect(page.getByRole("form", { name: "Record an insulation-resistance reading" })).toBeVisible();
    await expectPageKept(page);
    await untilControlled(page);

    const kept = await keptEntry(page);
    const manifest = precacheManifest();
    const stored = await cacheStorage(page);
    const figures = {
      measuredAt: new Date().toISOString(),
      precache: { manifest, cacheStorage: stored },
      keptReads500: kept,
      bound: { maxBytes: MAX_BYTES, maxAgeMs: MAX_AGE_MS },
    };
    mkdirSync(".data/test-results", { recursive: true });
    writeFileSync(".data/test-results/offline-sizes.json", JSON.stringify(figures, null, 2));
    const summary =
      `precache ${manifest.entries} entries, ${kib(manifest.bytes)} as built (${kib(manifest.gzipBytes)} gzip; fonts ` +
      `${kib(manifest.fontBytes)}); Cache Storage ${stored.entries} entries, ${kib(stored.bytes)}; kept reads for a ` +
      `500-position board: ${kept.queries} reads, ${kib(kept.utf8)} (biggest: ${kept.biggest
        .map((b) => `${b.key} ${kib(b.chars)}`)
        .join("; ")})`;
    test.info().annotations.push({ type: "offline sizes", description: summary });
    console.log(`[offline sizes] ${summary}`);

    // Installable: the app's own name, icons, theme colour and start page in the manifest the worker precaches.
    const webManifest = (await (await page.request.get("/manifest.webmanifest")).json()) as {
      name: string;
      short_name: string;
      start_url: string;
      theme_color: string;
      display: string;
      icons: Array<{ src: string; sizes: string }>;
    };
    expect(webManifest).toMatchObject({ name: expect.stringContaining("Tideline"), start_url: "/" });
    expect(webManifest.theme_color).toMatch(/^#[0-9a-f]{6}$/i);
    expect(webManifest.icons.map((i) => i.sizes)).toEqual(expect.arrayContaining(["192x192", "512x512"]));
    for (const icon of webManifest.icons)
      expect((await page.request.get(`/${icon.src.replace(/^\//, "")}`)).ok()).toBe(true);
    expect(manifest.entries).toBeGreaterThan(50);
    expect(manifest.fontBytes).toBeGreaterThan(0);
    // The worker installed exactly what the manifest lists (Cache Storage may also hold the worker's own runtime).
    expect(stored.entries).toBeGreaterThanOrEqual(manifest.entries);
    expect(kept.utf8).toBeLessThan(MAX_BYTES);
    // The board is among the biggest reads (site-wide reads grow with what other tests add to the demo site).
    expect(kept.biggest.map((b) => b.key).join(" ")).toContain(boardId);

    // Sign-out: none of this person's reads stays on the phone (waiting past the write throttle).
    await page.getByRole("button", { name: "Sign out" }).click();
    await expect(page.getByLabel("E-mail")).toBeVisible();
    await page.waitForTimeout(1_500); // a throttled write left over must not bring them back: give it its second
    const after = await keptQueryKeys(page);
    expect(after.filter((k) => k !== JSON.stringify(["auth", "session"]))).toEqual([]);

    // A copy older than the bound's age is not shown: sign in, keep a page, age the copy, open with no signal.
    await signIn(page, "volunteer");
    await page.goto(`/sites/${siteId}/boards/${boardId}`);
    await expect(page.getByRole("heading", { name })).toBeVisible();
    await expectPageKept(page);
    await context.setOffline(true);
    // Age the copy from a page of the same origin that runs no app code (an icon, served by the worker),
    // so that no write of the app's brings it back up to date.
    await page.goto("/icons/tideline.svg");
    await page.evaluate(
      (age) =>
        new Promise<void>((resolve, reject) => {
          const open = indexedDB.open("tideline-cache");
          open.onerror = () => reject(open.error);
          open.onsuccess = () => {
            const store = open.result.transaction("queries", "readwrite").objectStore("queries");
            const get = store.get("tideline-query-cache");
            get.onsuccess = () => {
              const c = JSON.parse(get.result as string) as { timestamp: number };
              c.timestamp = Date.now() - age;
              const put = store.put(JSON.stringify(c), "tideline-query-cache");
              put.onsuccess = () => resolve();
              put.onerror = () => reject(put.error);
            };
          };
        }),
      MAX_AGE_MS + 3600_000,
    );
    await page.goto(`/sites/${siteId}/boards/${boardId}`);
    // Nothing of it is shown: not even the session, so the app says it needs the connection.
    await expect(page.getByTestId("not-on-phone")).toBeVisible();
    await expect(page.getByRole("heading", { name })).toHaveCount(0);
    await page.screenshot({ path: ".data/test-results/offline-aged-copy.png" });
  });
});
