import { expect, test, type Page } from "@playwright/test";
import { signIn } from "./support/auth";

/**
 * Every page fits a 360 × 740 phone without sideways scrolling. Each page is
 * visited as a role that may open it; the check is the document's scrollWidth against the
 * viewport's width. When a page is too wide, the message names the widest elements that stick out, to find the
 * culprit. Since 2026-12-04 no box inside the page scrolls sideways either (a table read in a 328 px window, its
 * title cut off, fits the page and is still unread): only the board's front drawing does, on purpose (a drawing of
 * the board to scale, `data-testid="board-elevation"`).
 */
test.use({ viewport: { width: 360, height: 740 } });
test.setTimeout(300_000);

async function json<T>(page: Page, url: string): Promise<T> {
  const r = await page.request.get(url);
  expect(r.status(), url).toBe(200);
  return (await r.json()) as T;
}

async function demoSiteId(page: Page) {
  const { sites } = await json<{ sites: Array<{ id: string; name: string }> }>(page, "/api/sites");
  return sites.find((s) => s.name === "MV Kestrel Lantern")!.id;
}

/** What sticks out past the right edge, widest first (for the failure message). */
const overflowing = (page: Page) =>
  page.evaluate(() => {
    const w = document.documentElement.clientWidth;
    const out: string[] = [];
    for (const el of Array.from(document.body.querySelectorAll<HTMLElement>("*"))) {
      const r = el.getBoundingClientRect();
      if (r.right > w + 1 && r.width > 0) {
        // Inside a box that scrolls sideways on its own: that box's business, not the page's.
        let p = el.parentElement;
        let clipped = false;
        while (p && p !== document.body) {
          const ox = getComputedStyle(p).overflowX;
          if (ox === "auto" || ox === "scroll" || ox === "hidden" || ox === "clip") {
            clipped = true;
            break;
          }
          p = p.parentElement;
        }
        if (!clipped)
          out.push(
            `${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ""}.${String(el.className).slice(0, 60)} right=${Math.round(r.right)} «${(el.textContent ?? "").trim().slice(0, 40)}»`,
          );
      }
    }
    return out.slice(0, 8);
  });

/** Boxes inside the page that scroll sideways (the board's front drawing excepted), for the failure message. */
const sidewaysBoxes = (page: Page) =>
  page.evaluate(() =>
    Array.from(document.querySelectorAll<HTMLElement>("main *"))
      .filter((el) => {
        const ox = getComputedStyle(el).overflowX;
        return (ox === "auto" || ox === "scroll") && el.scrollWidth > el.clientWidth + 1;
      })
      .filter((el) => !el.closest('[data-testid="board-elevation"]'))
      .map(
        (el) =>
          `${el.tagName.toLowerCase()}.${String(el.className).slice(0, 50)} ${el.scrollWidth} px in ${el.clientWidth} «${(el.querySelector("caption, [aria-label]")?.textContent ?? el.textContent ?? "").trim().slice(0, 40)}»`,
      ),
  );

async function fits(page: Page, url: string, ready: (p: Page) => Promise<void>) {
  await page.goto(url);
  await ready(page);
  // Not "networkidle": the offline probe and live pages keep asking. Wait until nothing says it is loading.
  await expect(page.locator('[aria-busy="true"], [role="status"]:has-text("…")')).toHaveCount(0);
  await page.evaluate(() => document.fonts.ready);
  const [scroll, inner] = await page.evaluate(() => [document.documentElement.scrollWidth, window.innerWidth]);
  if (scroll > inner)
    expect
      .soft(scroll, `${url} is ${scroll} px wide:\n${(await overflowing(page)).join("\n")}`)
      .toBeLessThanOrEqual(inner);
  expect.soft(await sidewaysBoxes(page), `${url}: boxes that scroll sideways`).toEqual([]);
  // Nothing written against the screen's edge: the page's heading sits inside its margin.
  const heading = await page.getByRole("heading", { level: 1 }).first().boundingBox();
  expect.soft(heading?.x ?? 0, `${url}: the heading touches the screen's left edge`).toBeGreaterThanOrEqual(8);
}

const h1 = (name?: RegExp | string) => async (p: Page) => {
  await expect(p.getByRole("heading", { level: 1, ...(name ? { name } : {}) }).first()).toBeVisible();
};

test("the curator's pages fit a 360 px phone", async ({ page }) => {
  await signIn(page, "curator");
  const site = await demoSiteId(page);
  const boards = await json<Array<{ id: string; name: string }>>(page, `/api/sites/${site}/boards`);
  const board = boards[0]!;
  const detail = await json<{ positions: Array<{ id: string; component: { id: string } | null }> }>(
    page,
    `/api/sites/${site}/boards/${board.id}`,
  );
  const withComponent = detail.positions.find((p) => p.component)!;
  const defects = await json<{ rows: Array<{ id: string }> }>(page, `/api/sites/${site}/defects?size=1`);
  const parts = await json<{ lines: Array<{ id: string }> }>(page, `/api/sites/${site}/parts?size=1`);
  const s = `/sites/${site}`;
  const pages: Array<[string, (p: Page) => Promise<void>]> = [
    [s, h1()],
    [`${s}/members`, h1()],
    [`${s}/boards`, h1()],
    [`${s}/boards/new`, h1()],
    [`${s}/boards/${board.id}`, h1()],
    [`${s}/boards/${board.id}?position=${withComponent.id}`, h1()],
    [`${s}/log`, h1()],
    [`${s}/inventory/import`, h1()],
    [`${s}/flood`, h1()],
    [`${s}/defects`, h1()],
    [`${s}/defects/new`, h1()],
    [`${s}/defects/${defects.rows[0]!.id}`, h1()],
    [`${s}/defects/how-priority-works`, h1()],
    [`${s}/repair-plan`, h1()],
    [`${s}/readings`, h1()],
    [`${s}/readings/boards/${board.id}`, h1()],
    [`${s}/readings/components/${withComponent.component!.id}`, h1()],
    [`${s}/readings/criteria`, h1()],
    [`${s}/photos`, h1()],
    [`${s}/photos/shoot-list`, h1()],
    [`${s}/photos/gallery`, h1()],
    [`${s}/parts/${parts.lines[0]!.id}`, h1()],
    [`${s}/reports`, h1()],
    [`${s}/return-to-service`, h1()],
    [`${s}/return-to-service/settings`, h1()],
    [`${s}/boards/${board.id}/return-to-service`, h1()],
    [`${s}/boards/${board.id}/watch`, h1()],
    ["/account", h1()],
    ["/safety", h1()],
    ["/scan", h1()],
  ];
  for (const [url, ready] of pages) await fits(page, url, ready);
});

test("the admin's pages and the public pages fit a 360 px phone", async ({ page, browser }) => {
  await signIn(page, "admin");
  for (const url of ["/sites", "/admin", "/admin/mailbox", "/account"]) await fits(page, url, h1());

  // A share link the scrounger hands out, opened by someone with no account.
  const curator = await browser.newPage({ viewport: { width: 360, height: 740 } });
  await signIn(curator, "curator");
  const site = await demoSiteId(curator);
  const origin = new URL(curator.url()).origin;
  const made = await curator.request.post(`/api/sites/${site}/parts/share-links`, {
    data: { label: `phone check ${Date.now()}` },
    headers: { origin },
  });
  expect(made.status()).toBe(201);
  const { token } = (await made.json()) as { token: string };
  await curator.close();

  const anon = await browser.newPage({ viewport: { width: 360, height: 740 } });
  for (const url of ["/sign-in", "/reset-password", `/share/parts/${token}`]) await fits(anon, url, h1());
  await anon.close();
});

// Once too wide on a 360 px phone: the board set-up's position-order list (631 px; its rows
// now wrap their buttons under the position) and the wanted-parts page (475 px: an off-screen label inside the
// table escaped its scroll box, which now holds its own positioned content).
test("board set-up and the wanted-parts page fit a 360 px phone", async ({ page }) => {
  await signIn(page, "curator");
  const site = await demoSiteId(page);
  const boards = await json<Array<{ id: string }>>(page, `/api/sites/${site}/boards`);
  await fits(page, `/sites/${site}/boards/${boards[0]!.id}/setup`, h1());
  await fits(page, `/sites/${site}/parts`, h1());
});
