/**
 * The curator's spreadsheet round trip: export the inventory, edit it as a
 * spreadsheet saves it (Windows-1252, semicolons, CRLF, ="…" text shown as its value), choose
 * the file, see what will be created / changed / left alone, apply, and find the change on
 * the position. The board is made by this test, so it does not depend on other flows.
 */
import { expect, test } from "@playwright/test";
import iconv from "iconv-lite";
import Papa from "papaparse";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";

test("a curator exports, edits in a spreadsheet, checks the plan and applies it", async ({ page }) => {
  test.setTimeout(120_000);
  await signIn(page, "curator");
  const siteUrl = page.url().replace(/(\/sites\/[^/]+).*/, "$1");
  const siteId = siteUrl.split("/sites/")[1];
  const board = `Round-trip board ${Date.now().toString(36)}`;
  const seed = await page.request.post(`/api/sites/${siteId}/inventory/import?mode=commit`, {
    headers: { "content-type": "text/csv", origin: new URL(page.url()).origin },
    data: `board,designation,kind,grid_row,grid_col,maker,tag_number\r\n${board},RT-1,meter,1,1,Calloway Instrument Works,\r\n${board},RT-2,fuse,1,2,,\r\n`,
  });
  expect(seed.status()).toBe(201);

  await page.goto(`${siteUrl}/inventory/import`);
  const href = await page.getByRole("link", { name: "Export the current inventory" }).getAttribute("href");
  const exported = (await (await page.request.get(href!)).text()).replace(/^\uFEFF/, "");
  const rows = Papa.parse<string[]>(exported, { skipEmptyLines: true }).data;
  const h = rows[0];
  const mine = rows.filter((r) => r[h.indexOf("board")] === board);
  mine.find((r) => r.includes("RT-1"))![h.indexOf("maker")] = "Établissements Vérin";
  const file = iconv.encode(
    Papa.unparse(
      [h, ...mine].map((r) => r.map((c) => c.replace(/^="(.*)"$/, "$1"))),
      { delimiter: ";", newline: "\r\n" },
    ) + "\r\n",
    "windows-1252",
  );

  await page
    .getByLabel("Choose a CSV file")
    .setInputFiles({ name: "inventory.csv", mimeType: "text/csv", buffer: file });
  await page.getByRole("button", { name: "Check the file" }).click();
  const summary = page.getByTestId("import-summary");
  await expect(summary).toContainText("Read as windows-1252");
  await expect(summary).toContainText("cells separated by semicolons");
  await expect(summary).toContainText("2 rows: 0 new, 1 changed, 1 unchanged, 0 with problems");
  const changed = page.locator("li", { hasText: "RT-1" }).filter({ hasText: "changes" });
  await expect(changed).toContainText("Calloway Instrument Works");
  await expect(changed).toContainText("Établissements Vérin");
  await expectNoSeriousA11yViolations(page, "import plan");

  await page.setViewportSize({ width: 360, height: 740 });
  await page.screenshot({ path: ".data/test-results/import-plan-phone.png", fullPage: true });
  await page.getByRole("button", { name: "Apply: 0 new, 1 changed" }).click();
  await expect(page.getByRole("heading", { name: "Applied" })).toBeVisible();

  const again = await page.request.get(href!);
  expect(await again.text()).toContain("Établissements Vérin");
});
