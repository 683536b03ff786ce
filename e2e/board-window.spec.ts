/**
 * A board of thousands of positions draws only the tiles on screen: the test makes
 * its own 40 × 50 board (2,000 positions) through the inventory import, then checks on a phone
 * viewport that only a window of tiles is in the page, that scrolling reaches the last row and
 * column, that the arrow keys walk past the drawn window, and that print draws every tile.
 */
import { expect, test, type Page } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";
import { expectKept, keptData } from "./support/offline";

const ROWS = 40;
const COLS = 50;
const at = (r: number, c: number) => `W${String(r).padStart(2, "0")}-${String(c).padStart(2, "0")}`;

/** Signs in as the curator and makes a ROWS × COLS board of fuses through the inventory import. */
async function makeBoard(page: Page, prefix: string) {
  await signIn(page, "curator");
  const siteId = page.url().split("/sites/")[1].split("/")[0];
  const name = `${prefix} ${Date.now().toString(36)}`;
  const lines = ["board,designation,kind,grid_row,grid_col"];
  for (let r = 1; r <= ROWS; r++) for (let c = 1; c <= COLS; c++) lines.push(`${name},${at(r, c)},fuse,${r},${c}`);
  const made = await page.request.post(`/api/sites/${siteId}/inventory/import?mode=commit`, {
    headers: { "content-type": "text/csv", origin: new URL(page.url()).origin },
    data: lines.join("\r\n") + "\r\n",
    timeout: 120_000,
  });
  expect(made.status(), await made.text()).toBe(201);
  const boards = (await (await page.request.get(`/api/sites/${siteId}/boards`)).json()) as {
    id: string;
    name: string;
  }[];
  return { siteId, board: boards.find((b) => b.name === name)! };
}

test("a board of 2,000 positions draws a window of tiles, scrolls to the last one and prints whole", async ({
  page,
}) => {
  test.setTimeout(300_000);
  const { siteId, board } = await makeBoard(page, "Windowed board");

  await page.setViewportSize({ width: 360, height: 740 });
  await page.goto(`/sites/${siteId}/boards/${board.id}`);
  const elevation = page.getByTestId("board-elevation");
  const tiles = elevation.locator("[data-position-id]");
  await expect(page.getByTestId(`tile-${at(1, 1)}`)).toBeAttached();
  await expect(elevation).toHaveAttribute("data-windowed", "true");
  await expect(page.getByRole("group", { name: /2000 positions/ })).toBeVisible();
  const first = await tiles.count();
  expect(first).toBeGreaterThan(0);
  expect(first).toBeLessThan(300); // a window, not 2,000
  await page.screenshot({ path: ".data/test-results/board-window-phone.png" });

  // Every page read first: rows grow to fit their tiles' words, so the board's height can still change while the
  // later pages arrive, and a scroll to its bottom edge made before then can end short of it.
  await expect(page.getByTestId("board-reading")).toHaveAttribute("data-complete", "true");
  // Scroll the page to the board's bottom edge and the board's own box to its right edge: the last tile is drawn.
  await elevation.evaluate((el) => {
    window.scrollTo(0, el.getBoundingClientRect().bottom + window.scrollY - window.innerHeight);
    el.scrollLeft = el.scrollWidth;
  });
  const last = page.getByTestId(`tile-${at(ROWS, COLS)}`);
  await expect(last).toBeInViewport();
  await page.screenshot({ path: ".data/test-results/board-window-phone-end.png" });
  await expect(page.getByTestId(`tile-${at(2, 2)}`)).toHaveCount(0); // W01-01 stays: it holds the tab stop
  expect(await tiles.count()).toBeLessThan(300);

  // The arrow keys walk beyond the drawn window: from the last tile up 20 rows and left 10 columns.
  await last.focus();
  for (let i = 0; i < 20; i++) await page.keyboard.press("ArrowUp");
  for (let i = 0; i < 10; i++) await page.keyboard.press("ArrowLeft");
  const focused = page.locator(":focus");
  await expect(focused).toHaveAttribute("data-testid", `tile-${at(ROWS - 20, COLS - 10)}`);
  await expect(focused).toBeInViewport();
  await page.keyboard.press("Enter");
  await expect(page).toHaveURL(/position=/);
  await expectNoSeriousA11yViolations(page, "windowed board");

  // Print draws every tile (slow on a loaded machine: every tile is drawn); the screen goes back to a window.
  await page.emulateMedia({ media: "print" });
  await expect(tiles).toHaveCount(ROWS * COLS, { timeout: 90_000 });
  await page.emulateMedia({ media: "screen" });
  await expect.poll(() => tiles.count(), { timeout: 90_000 }).toBeLessThan(300);

  // The board came in pages (the first with the board, the rest at idle time): the copy kept on the phone holds
  // every one of its 2,000 positions, for logging against any of them with no signal.
  await expect(page.getByTestId("board-reading")).toHaveAttribute("data-complete", "true");
  await expectKept(page, ["inventory", siteId, "board", board.id]);
  const kept = (await keptData(page, ["inventory", siteId, "board", board.id])) as {
    pages: { positions: { designation: string }[]; next: string | null }[];
  };
  expect(kept.pages.length).toBeGreaterThan(1);
  expect(kept.pages[kept.pages.length - 1].next).toBeNull();
  const designations = kept.pages.flatMap((p) => p.positions.map((t) => t.designation));
  expect(designations).toHaveLength(ROWS * COLS);
  expect(designations[designations.length - 1]).toBe(at(ROWS, COLS));

  // The same board on a desktop screen, from its top.
  await page.setViewportSize({ width: 1280, height: 900 });
  await elevation.evaluate((el) => {
    el.scrollLeft = 0;
    window.scrollTo(0, 0);
  });
  await expect(page.getByTestId(`tile-${at(1, 1)}`)).toBeInViewport();
  await page.screenshot({ path: ".data/test-results/board-window-desktop.png" });
});

test("a decision on one tile of a board of three pages reads that page again, not the whole board", async ({
  page,
}) => {
  test.setTimeout(300_000);
  await signIn(page, "curator");
  const siteId = page.url().split("/sites/")[1].split("/")[0];
  const name = `Paged board ${Date.now().toString(36)}`;
  // 40 × 40 = 1,600 positions: the head's 500, then 1,000, then 100 (BOARD_PAGE, BOARD_LATER_PAGE).
  const lines = ["board,designation,kind,grid_row,grid_col"];
  for (let r = 1; r <= 40; r++)
    for (let c = 1; c <= 40; c++) lines.push(`${name},${at(r, c)},molded_case_breaker,${r},${c}`);
  const made = await page.request.post(`/api/sites/${siteId}/inventory/import?mode=commit`, {
    headers: { "content-type": "text/csv", origin: new URL(page.url()).origin },
    data: lines.join("\r\n") + "\r\n",
    timeout: 120_000,
  });
  expect(made.status(), await made.text()).toBe(201);
  const boards = (await (await page.request.get(`/api/sites/${siteId}/boards`)).json()) as {
    id: string;
    name: string;
  }[];
  const board = boards.find((b) => b.name === name)!;
  // Row 20, column 1: position 761 of 1,600, on the second page.
  const pageTwo = (await (
    await page.request.get(
      `/api/sites/${siteId}/boards/${board.id}/tiles?after=${encodeURIComponent("0.0.0.00000000-0000-0000-0000-000000000000")}&size=2000`,
    )
  ).json()) as { positions: { id: string; designation: string }[] };
  const target = pageTwo.positions.find((t) => t.designation === at(20, 1))!;

  await page.goto(`/sites/${siteId}/boards/${board.id}?position=${target.id}`);
  await expect(page.getByTestId("board-reading")).toHaveAttribute("data-complete", "true");
  const panel = page.getByTestId("position-panel");
  await expect(panel.getByRole("heading", { name: at(20, 1) })).toBeVisible();

  const asked: string[] = [];
  page.on("request", (r) => {
    const u = new URL(r.url());
    if (r.method() === "GET" && u.pathname.startsWith(`/api/sites/${siteId}/boards/${board.id}`))
      asked.push(u.pathname.slice(`/api/sites/${siteId}/boards/${board.id}`.length) + u.search);
  });
  const recommended = (await panel.getByTestId("recommendation").locator("strong").innerText()).trim();
  const choice = recommended === "Rebuild" ? "Replace" : "Rebuild";
  await panel.getByRole("radio", { name: new RegExp(`^${choice}`) }).check();
  await panel.getByLabel(/Why override/).fill("Test: one tile's decision reads its page again.");
  await panel.getByRole("button", { name: "Save override" }).click();
  await expect(panel.getByRole("status").filter({ hasText: "Saved." })).toBeVisible();

  // The kept board holds the decision, read with the one page that holds the tile: the head and the third page
  // were not asked for again; the board's thumbnail (on the board list, not on screen) is only marked stale.
  const tile = page.getByTestId(`tile-${at(20, 1)}`);
  await tile.scrollIntoViewIfNeeded();
  await expect(tile).toContainText(choice.toLowerCase());
  expect(asked).toEqual([expect.stringMatching(/^\/tiles\?after=[^&]+&size=1000$/)]);
  await page.screenshot({ path: ".data/test-results/board-one-page-after-write.png" });
});

test("rows scrolled to before the pages in order reach them are read first, from the window's first row", async ({
  page,
}) => {
  test.setTimeout(300_000);
  const { siteId, board } = await makeBoard(page, "Window first");

  // The pages in order (after a key a page gave) wait until released; a page from a row's start goes at once.
  let release = () => {};
  const held = new Promise<void>((r) => (release = r));
  const fromRow: string[] = [];
  await page.route(`**/api/sites/${siteId}/boards/${board.id}/tiles?**`, async (route) => {
    const after = new URL(route.request().url()).searchParams.get("after") ?? "";
    if (after.endsWith(".ffffffff-ffff-ffff-ffff-ffffffffffff")) fromRow.push(after);
    else await held;
    await route.continue();
  });

  await page.setViewportSize({ width: 360, height: 740 });
  await page.goto(`/sites/${siteId}/boards/${board.id}`);
  const elevation = page.getByTestId("board-elevation");
  await expect(page.getByTestId(`tile-${at(1, 1)}`)).toBeAttached();
  await expect(page.getByTestId("board-reading")).toHaveAttribute("data-complete", "false");
  // To the board's bottom edge at once, the first page (rows 1–10) all that is read.
  await elevation.evaluate((el) =>
    window.scrollTo(0, el.getBoundingClientRect().bottom + window.scrollY - innerHeight),
  );
  const lastRow = page.getByTestId(`tile-${at(ROWS, 1)}`);
  await expect(lastRow).toBeInViewport();
  await expect(page.getByTestId("board-reading")).toHaveAttribute("data-complete", "false");
  expect(fromRow.length).toBeGreaterThan(0);
  // The rows between the first page and the window show that they are coming; the last rows are drawn.
  await expect(page.getByTestId("board-rows-coming").first()).toBeAttached();
  await page.screenshot({ path: ".data/test-results/board-window-first-phone.png" });
  await page.setViewportSize({ width: 1280, height: 900 });
  await elevation.evaluate((el) =>
    window.scrollTo(0, el.getBoundingClientRect().bottom + window.scrollY - innerHeight),
  );
  await expect(lastRow).toBeInViewport();
  await page.screenshot({ path: ".data/test-results/board-window-first-desktop.png" });

  // Released, the pages in order still come to the end: the whole board is read (and kept), and drawn in one piece.
  release();
  await expect(page.getByTestId("board-reading")).toHaveAttribute("data-complete", "true", { timeout: 60_000 });
  await expect(page.getByTestId("board-rows-coming")).toHaveCount(0);
  await expect(lastRow).toBeInViewport();
  await expectKept(page, ["inventory", siteId, "board", board.id]);
  const kept = (await keptData(page, ["inventory", siteId, "board", board.id])) as {
    pages: { positions: { designation: string }[] }[];
  };
  expect(kept.pages.flatMap((p) => p.positions)).toHaveLength(ROWS * COLS);
});
