/**
 * The site's time zone and currency, each a select and a save button for the curator: the choice
 * is saved, the confirmation shows, and the page keeps it after a reload. Each test puts the
 * demo site's setting back, since other flows read exports and costs in it.
 */
import { expect, test, type Page } from "@playwright/test";
import { signIn } from "./support/auth";

async function chooseAndSave(page: Page, label: RegExp, values: string[], button: string, note: string) {
  const select = page.getByLabel(label);
  const before = await select.inputValue();
  const value = values.find((v) => v !== before)!;
  await select.selectOption(value);
  const saved = page.waitForResponse((r) => r.request().method() === "PUT" && /\/api\/sites\/[^/]+\//.test(r.url()));
  await page.getByRole("button", { name: button }).click();
  expect((await saved).status()).toBe(200);
  await expect(page.getByRole("status").filter({ hasText: note })).toBeVisible();
  await page.reload();
  await expect(page.getByLabel(label)).toHaveValue(value);
  return before;
}

test("a curator changes the site's time zone and sees it kept", async ({ page }) => {
  await signIn(page, "curator");
  const siteUrl = page.url().replace(/(\/sites\/[^/]+).*/, "$1");
  await page.goto(`${siteUrl}/inventory/import`);
  const before = await chooseAndSave(
    page,
    /Site time zone/,
    ["America/Halifax", "Europe/Lisbon"],
    "Save time zone",
    "Saved.",
  );
  await chooseAndSave(page, /Site time zone/, [before], "Save time zone", "Saved.");
});

test("a curator changes the site's currency and sees it kept", async ({ page }) => {
  await signIn(page, "curator");
  const siteUrl = page.url().replace(/(\/sites\/[^/]+).*/, "$1");
  await page.goto(`${siteUrl}/parts`);
  const note = "Amounts keep their numbers";
  const before = await chooseAndSave(page, /Site currency/, ["NOK", "EUR"], "Save currency", note);
  await chooseAndSave(page, /Site currency/, [before], "Save currency", note);
});
