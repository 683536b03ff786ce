import { expect, test, type Page } from "@playwright/test";
import { signIn } from "./support/auth";

/**
 * Issue 14 item 10: on the board drawing the water line's words never cover a tile, and the custody
 * words on a tile are whole ("OUT · TAGGED", "WORKSHOP"), never cut to "OUT · …" — at 1280 px and on a phone.
 */
async function openMainBoard(page: Page) {
  await signIn(page, "curator");
  const site = page.url().match(/\/sites\/([0-9a-f-]{36})/)![1];
  const boards = (await (await page.request.get(`/api/sites/${site}/boards`)).json()) as Array<{
    id: string;
    name: string;
  }>;
  const main = boards.find((b) => b.name.startsWith("Main switchboard"))!;
  await page.goto(`/sites/${site}/boards/${main.id}`);
  await expect(page.getByTestId("board-elevation")).toBeVisible();
}

for (const viewport of [
  { width: 1280, height: 900 },
  { width: 360, height: 740 },
]) {
  test(`at ${viewport.width} px the water line's words sit off the tiles and custody words are whole`, async ({
    page,
  }) => {
    await page.setViewportSize(viewport);
    await openMainBoard(page);
    const key = page.getByTestId("water-line-key");
    await expect(key).toContainText("Flood water line: 1100 mm");

    const report = await page.evaluate(() => {
      const tiles = [...document.querySelectorAll<HTMLElement>('[data-testid^="tile-"][data-position-id]')];
      const rects = tiles.map((t) => t.getBoundingClientRect());
      // Every element carrying the words "water line" must not overlap any tile.
      const words = [...document.querySelectorAll<HTMLElement>("[data-testid=board-elevation] *")].filter(
        (e) => e.children.length === 0 && /water line/i.test(e.textContent ?? ""),
      );
      const covering = words.filter((w) => {
        const r = w.getBoundingClientRect();
        return rects.some((t) => r.left < t.right && r.right > t.left && r.top < t.bottom && r.bottom > t.top);
      }).length;
      const custody = [...document.querySelectorAll<HTMLElement>("[data-testid=tile-custody]")];
      const cut = custody
        .filter((c) => {
          const tile = c.closest<HTMLElement>("[data-position-id]")!.getBoundingClientRect();
          const r = c.getBoundingClientRect();
          return c.scrollWidth > c.clientWidth + 1 || r.right > tile.right + 0.5 || r.bottom > tile.bottom + 0.5;
        })
        .map((c) => `${c.closest("[data-position-id]")!.getAttribute("data-testid")}: ${c.textContent}`);
      return { words: words.length, covering, custody: custody.length, cut };
    });
    expect(report.words).toBeGreaterThan(0);
    expect(report.covering).toBe(0);
    expect(report.custody).toBeGreaterThan(20); // the demo board has many parts out of place
    expect(report.cut).toEqual([]);
    await expect(page.getByTestId("board-elevation").getByText("…")).toHaveCount(0);
  });
}
