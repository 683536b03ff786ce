import { expect, test, type Page } from "@playwright/test";
import { signIn } from "./support/auth";

/**
 * On the board drawing the water line's words never cover a tile, and no word on a tile is
 * cut — custody ("OUT · TAGGED", "WORKSHOP", never "OUT · …"), kind and rating ("MCCB 100 A"), and a long
 * designation, which takes a smaller face on a one-column tile and wraps — at 1280 px and on a phone.
 */
const LONG = "ER-FAN-EXHAUST-12"; // 17 characters: a smaller face, wrapped on a one-column tile
const LONGEST = "LTG-DIST-AFT-PORT-FEEDER-07-SPARE-WAY-B1"; // 40, the most a designation may have

async function mainBoard(page: Page) {
  const site = page.url().match(/\/sites\/([0-9a-f-]{36})/)![1];
  const boards = (await (await page.request.get(`/api/sites/${site}/boards`)).json()) as Array<{
    id: string;
    name: string;
  }>;
  return { site, board: boards.find((b) => b.name.startsWith("Main switchboard"))! };
}

/** Renames a position through the API (the curator's set-up does the same) and answers its old name. */
async function rename(page: Page, site: string, positionId: string, designation: string) {
  const url = `/api/sites/${site}/positions/${positionId}`;
  const detail = (await (await page.request.get(url)).json()) as { position: { designation: string; version: number } };
  const r = await page.request.patch(url, {
    headers: { origin: new URL(page.url()).origin },
    data: { designation, version: detail.position.version },
  });
  expect(r.status(), await r.text()).toBe(200);
  return detail.position.designation;
}

/** Every element carrying words inside a tile, measured: cut when it scrolls or leaves its tile; and the key's box. */
function measure() {
  const tiles = [...document.querySelectorAll<HTMLElement>('[data-testid^="tile-"][data-position-id]')];
  const cut: string[] = [];
  for (const tile of tiles) {
    const t = tile.getBoundingClientRect();
    if (tile.scrollHeight > tile.clientHeight + 1 || tile.scrollWidth > tile.clientWidth + 1)
      cut.push(
        `${tile.dataset.testid} overflows (${tile.scrollWidth}×${tile.scrollHeight} in ${tile.clientWidth}×${tile.clientHeight})`,
      );
    for (const e of tile.querySelectorAll<HTMLElement>("*")) {
      if (![...e.childNodes].some((n) => n.nodeType === Node.TEXT_NODE && n.textContent!.trim())) continue;
      const r = e.getBoundingClientRect();
      if (
        e.scrollWidth > e.clientWidth + 1 ||
        r.left < t.left - 0.5 ||
        r.right > t.right + 0.5 ||
        r.top < t.top - 0.5 ||
        r.bottom > t.bottom + 0.5
      )
        cut.push(`${tile.dataset.testid}: "${e.textContent}"`);
    }
  }
  const boxes = tiles.map((t) => t.getBoundingClientRect());
  const overlaps = (r: DOMRect) =>
    boxes.filter((t) => r.left < t.right && r.right > t.left && r.top < t.bottom && r.bottom > t.top).length;
  // Every element carrying the words "water line" (the key, and anything else) must not overlap any tile.
  const words = [...document.querySelectorAll<HTMLElement>("[data-testid=board-elevation] *")].filter(
    (e) => e.children.length === 0 && /water line/i.test(e.textContent ?? ""),
  );
  const key = document.querySelector<HTMLElement>("[data-testid=water-line-key]")!.getBoundingClientRect();
  return {
    tiles: tiles.length,
    custody: document.querySelectorAll("[data-testid=tile-custody]").length,
    cut,
    words: words.length,
    wordsOverTiles: words.reduce((n, w) => n + overlaps(w.getBoundingClientRect()), 0),
    keyOverTiles: overlaps(key),
  };
}

for (const viewport of [
  { width: 1280, height: 900 },
  { width: 360, height: 740 },
]) {
  test(`at ${viewport.width} px no word on a tile is cut, long designations wrap, and the water line's words sit off the tiles`, async ({
    page,
  }) => {
    await page.setViewportSize(viewport);
    await signIn(page, "curator");
    const { site, board } = await mainBoard(page);
    const detail = (await (await page.request.get(`/api/sites/${site}/boards/${board.id}`)).json()) as {
      positions: Array<{ id: string; designation: string; colSpan: number; component: { custody: string } | null }>;
    };
    // Two one-column tiles whose parts are out of place get long designations, then their own back.
    const [a, b] = detail.positions.filter((t) => t.colSpan === 1 && t.component && t.component.custody !== "in_place");
    const old = [await rename(page, site, a.id, LONG), await rename(page, site, b.id, LONGEST)];
    try {
      await page.goto(`/sites/${site}/boards/${board.id}`);
      await expect(page.getByTestId("board-elevation")).toBeVisible();
      await expect(page.getByTestId("water-line-key")).toContainText("Flood water line: 1100 mm");
      await expect(page.getByTestId("water-line-band")).toBeAttached();

      // The long designations are there whole, in the smaller face, over more than one line.
      for (const [name, id] of [
        [LONG, a.id],
        [LONGEST, b.id],
      ]) {
        const words = page.locator(`[data-position-id="${id}"]`).getByTestId("tile-designation");
        await expect(words).toHaveText(name);
        await expect(words).toHaveCSS("font-size", "11px");
        expect((await words.boundingBox())!.height).toBeGreaterThan(13 * 1.5);
      }

      const report = await page.evaluate(measure);
      expect(report.cut).toEqual([]);
      expect(report.custody).toBeGreaterThan(20); // the demo board has many parts out of place
      expect(report.words).toBeGreaterThan(0);
      expect(report.wordsOverTiles).toBe(0);
      expect(report.keyOverTiles).toBe(0);
      await expect(page.getByTestId("board-elevation").getByText("…")).toHaveCount(0);
      await page.screenshot({ path: `.data/test-results/board-words-${viewport.width}.png`, fullPage: true });
    } finally {
      await rename(page, site, a.id, old[0]);
      await rename(page, site, b.id, old[1]);
    }
  });
}
