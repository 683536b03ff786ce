import { expect, test, type Page } from "@playwright/test";
import { signIn } from "./support/auth";

/**
 * The words a crew member reads are the trade's — MCCB (a molded-case breaker; MCB is a
 * miniature one), ACB for the open-frame power breaker, defect states raised … accepted as is, the priority
 * score and the curator's order, store-room words on parts without a step counter, "Flood record" in the
 * menu, recommendations naming the guidance they follow, and estimates rounded to what the data supports.
 */
const siteOf = (page: Page) => page.url().match(/\/sites\/([0-9a-f-]{36})/)![1];
const text = (page: Page) => page.locator("body").innerText();

async function mainBoardId(page: Page, site: string) {
  const boards = (await (await page.request.get(`/api/sites/${site}/boards`)).json()) as Array<{
    id: string;
    name: string;
  }>;
  return boards.find((b) => b.name.startsWith("Main switchboard"))!.id;
}

test("the curator reads the trade's words on the board, the register, a defect, the wanted list and the readings", async ({
  page,
}) => {
  await signIn(page, "curator");
  const site = siteOf(page);
  const board = await mainBoardId(page, site);

  // The menu: "Flood record", never a bare "Flood".
  await expect(page.getByRole("link", { name: "Flood record", exact: true }).first()).toBeAttached();
  await expect(page.getByRole("link", { name: "Flood", exact: true })).toHaveCount(0);

  // The board: MCCB and ACB on tiles and in the key; no MCB or PWR anywhere.
  await page.goto(`/sites/${site}/boards/${board}`);
  await expect(page.getByTestId("board-elevation")).toBeVisible();
  const face = await page.getByTestId("board-elevation").innerText();
  expect(face).toMatch(/\bMCCB\b/);
  expect(face).toMatch(/\bACB\b/);
  let words = await text(page);
  expect(words).not.toMatch(/\bMCB\b/);
  expect(words).not.toMatch(/\bPWR\b/);
  // A recommendation names the guidance it follows; where the rule table comes from is not told here.
  await page.getByTestId("tile-1-1").click();
  await expect(page.getByText(/^Source: Follows NEMA GD 1/)).toBeVisible();
  words = await text(page);
  expect(words).not.toMatch(/from memory/i);

  // The register: the states in the trade's words, the priority score; no tracker words.
  await page.goto(`/sites/${site}/defects`);
  await expect(page.getByRole("heading", { level: 1, name: "Defect register" })).toBeVisible();
  await expect(page.getByRole("columnheader", { name: /Priority score/ })).toBeVisible();
  await page.locator("summary", { hasText: "Status" }).click();
  for (const state of [
    "Raised",
    "Scheduled",
    "Under repair",
    "Awaiting re-test",
    "Closed",
    "Deferred",
    "Accepted as is",
  ])
    await expect(page.getByRole("checkbox", { name: state, exact: true })).toBeAttached();
  await page.locator("summary", { hasText: "Flags" }).click();
  await expect(page.getByRole("checkbox", { name: "Curator's order" })).toBeAttached();
  words = await text(page);
  for (const old of [/\bTriaged\b/, /Won.t fix/i, /\bPoints\b/, /\bPins?\b/, /\bIn repair\b/, /Awaiting verification/i])
    expect(words).not.toMatch(old);

  // A defect page: why it ranks where it does, and the curator's order.
  await page.locator("tbody a[data-row-link]").first().click();
  await expect(page.getByRole("heading", { name: "Why it ranks here" })).toBeVisible();
  await expect(page.getByText("Curator's order").first()).toBeVisible();
  words = await text(page);
  for (const old of [/\bTriaged\b/, /Won.t fix/i, /\bPoints\b/, /\bPins?\b/]) expect(words).not.toMatch(old);

  // The wanted list: store-room words with their marks, no "n/5" step counter, no doubled "frame … frame".
  await page.goto(`/sites/${site}/parts?status=all`);
  await expect(page.getByTestId("part-row").first()).toBeVisible();
  words = await page.getByRole("table", { name: "Wanted parts" }).innerText();
  expect(words).not.toMatch(/\b\d\s*\/\s*5\b/);
  expect(words).not.toMatch(/\bframe\b[^\n·]*\bframe\b/i);
  expect(words).not.toMatch(/\bMCB\b|\bPWR\b/);

  // Dry-out figures in whole hours or whole days, never "about 5.05 days" (the wording itself: tests/domain/dry-out-series).
  await page.goto(`/sites/${site}/readings/boards/${board}`);
  await expect(page.getByRole("heading", { level: 2, name: "Dry-out" })).toBeVisible();
  await expect(
    page
      .getByRole("figure")
      .filter({ hasText: /minimum/ })
      .first(),
  ).toBeVisible();
  words = await text(page);
  expect(words).not.toMatch(/\d\.\d+\s*(days?|h)\b/);
  expect(words).not.toMatch(/from memory of/i);
});
