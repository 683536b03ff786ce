import { expect, type Page } from "@playwright/test";

/**
 * The query keys the phone has written to its kept reads (src/app/persist.ts: IndexedDB
 * "tideline-cache", store "queries", entry "tideline-query-cache"), as JSON strings.
 */
export function keptQueryKeys(page: Page): Promise<string[]> {
  return page.evaluate(
    () =>
      new Promise<string[]>((resolve) => {
        const open = indexedDB.open("tideline-cache");
        open.onerror = () => resolve([]);
        open.onsuccess = () => {
          const db = open.result;
          if (!db.objectStoreNames.contains("queries")) return resolve([]);
          const get = db.transaction("queries", "readonly").objectStore("queries").get("tideline-query-cache");
          get.onerror = () => resolve([]);
          get.onsuccess = () => {
            const raw = get.result as string | undefined;
            if (!raw) return resolve([]);
            const c = JSON.parse(raw) as { clientState: { queries: Array<{ queryKey: unknown[] }> } };
            resolve(c.clientState.queries.map((q) => JSON.stringify(q.queryKey)));
          };
        };
      }),
  );
}

/** The data of the first kept read whose query key starts with `prefix`, as the phone wrote it (undefined if none). */
export function keptData(page: Page, prefix: unknown[]): Promise<unknown> {
  const wanted = JSON.stringify(prefix).slice(0, -1);
  return page.evaluate(
    (w) =>
      new Promise<unknown>((resolve) => {
        const open = indexedDB.open("tideline-cache");
        open.onerror = () => resolve(undefined);
        open.onsuccess = () => {
          const db = open.result;
          if (!db.objectStoreNames.contains("queries")) return resolve(undefined);
          const get = db.transaction("queries", "readonly").objectStore("queries").get("tideline-query-cache");
          get.onerror = () => resolve(undefined);
          get.onsuccess = () => {
            const raw = get.result as string | undefined;
            if (!raw) return resolve(undefined);
            const c = JSON.parse(raw) as {
              clientState: { queries: Array<{ queryKey: unknown[]; state: { data: unknown } }> };
            };
            const q = c.clientState.queries.find((x) => {
              const k = JSON.stringify(x.queryKey);
              return k === `${w}]` || k.startsWith(`${w},`);
            });
            resolve(q?.state.data);
          };
        };
      }),
    wanted,
  );
}

/**
 * Waits until every read the open page uses is written on the phone: the sync bar says "kept for no
 * signal" (src/app/persist.ts `keptState`: nothing being read, nothing read but not yet written).
 */
export async function expectPageKept(page: Page) {
  await expect(page.getByTestId("kept-state"), "every read of this page kept on the phone").toHaveAttribute(
    "data-keeping",
    "0",
  );
}

/**
 * Waits until the open page's reads are all written (expectPageKept) and the phone has written each read (a query key starting with each given prefix) to its
 * kept reads. The write is throttled to once a second, so a test that leaves a page (or goes
 * offline) at once would otherwise race it; a person on a phone keeps the page open longer than that.
 */
export async function expectKept(page: Page, ...prefixes: unknown[][]) {
  await expectPageKept(page);
  const wanted = prefixes.map((p) => JSON.stringify(p).slice(0, -1));
  await expect
    .poll(
      async () => {
        const keys = await keptQueryKeys(page);
        return wanted.filter((w) => !keys.some((k) => k === `${w}]` || k.startsWith(`${w},`)));
      },
      { message: "reads kept on the phone", timeout: 15_000 },
    )
    .toEqual([]);
}

/**
 * Waits until the service worker controls the page. The first visit is served before the worker exists; once it is
 * active it claims the page (clientsClaim), but its install precaches the whole app first, which on a busy machine
 * can take longer than a poll's patience: wait for an active worker with the test's own timeout, then reload if it
 * has still not claimed the page.
 */
export async function untilControlled(page: Page) {
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => undefined));
  if (!(await page.evaluate(() => !!navigator.serviceWorker.controller))) await page.reload();
  await expect.poll(() => page.evaluate(() => !!navigator.serviceWorker.controller), { timeout: 15_000 }).toBe(true);
}
