import { readFileSync } from "node:fs";
import Papa from "papaparse";
import { expect, test } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";

const shot = (name: string) => `/tmp/parts-${name}.png`;

async function openList(page: import("@playwright/test").Page) {
  await signIn(page, "scrounger");
  await page.getByRole("link", { name: "Wanted parts" }).first().click();
  await expect(page.getByRole("heading", { level: 1, name: "Wanted parts" })).toBeVisible();
  await expect(page.getByTestId("part-row").first()).toBeVisible();
}

test("the scrounger filters the list, records a lead, exports CSV and opens the share link signed out", async ({
  page,
  browser,
}) => {
  await openList(page);
  await expectNoSeriousA11yViolations(page, "wanted list");
  await page.screenshot({ path: shot("list-desktop"), fullPage: true });

  // Filter by heritage rule: the demo has a hand-added spare-lamp line that accepts modern equivalents.
  await page.getByRole("combobox", { name: /^Heritage rule/ }).selectOption("modern_ok");
  await expect(page).toHaveURL(/heritageRule=modern_ok/);
  const rows = page.getByTestId("part-row");
  await expect(page.getByRole("table", { name: "Wanted parts" })).toHaveAttribute("aria-busy", "false");
  await expect(rows.first()).toContainText("spare clear lamps");
  for (const text of await rows.allInnerTexts()) expect(text).toContain("Modern equivalent acceptable");

  // Export the current filter and parse it back.
  const download = page.waitForEvent("download");
  await page.getByRole("link", { name: "Export CSV" }).click();
  const csv = readFileSync((await (await download).path())!, "utf8");
  expect(csv.charCodeAt(0)).toBe(0xfeff);
  const parsed = Papa.parse<string[]>(csv.slice(1), { skipEmptyLines: true }).data;
  expect(parsed[0]).toContain("Heritage rule");
  expect(parsed.length - 1).toBe(await rows.count());
  expect(parsed.slice(1).every((r) => r[2] === "Modern equivalent acceptable")).toBe(true);

  // Record a lead on that line.
  await rows.first().getByRole("link").first().click();
  await expect(page.getByTestId("heritage-rule").first()).toContainText("Modern equivalent acceptable");
  const source = `Chandlery in Saltmarrow (fictional) ${Date.now()}`;
  const leadForm = page.getByRole("form", { name: "Record a lead" });
  await leadForm.getByLabel("Where it might come from").fill(source);
  await leadForm.getByLabel("Asking price").fill("3.20");
  await leadForm.getByRole("button", { name: "Record lead" }).click();
  await expect(page.getByTestId("lead").filter({ hasText: source })).toBeVisible();
  await expect(page.getByText("Lead recorded", { exact: false }).first()).toBeVisible();
  await expectNoSeriousA11yViolations(page, "wanted-list line");
  await page.screenshot({ path: shot("line-desktop"), fullPage: true });

  // Share link, opened in a fresh browser context with no session.
  await page.getByRole("link", { name: "← Wanted parts" }).click();
  await page.getByLabel("Who is it for").fill("Harbour trust (fictional)");
  await page.getByRole("button", { name: "Create share link" }).click();
  const url = await page.getByTestId("share-url").innerText();
  const anon = await browser.newContext();
  const pub = await anon.newPage();
  await pub.goto(url);
  await expect(pub.getByRole("heading", { level: 1, name: /Parts wanted for MV Kestrel Lantern/ })).toBeVisible();
  await expect(pub.getByTestId("sheet-line").first()).toBeVisible();
  const body = await pub.locator("body").innerText();
  for (const secret of [
    source,
    "3.20",
    "Rufus Lade",
    "Ines Marrow",
    "Copperline",
    "counter@copperline.example",
    "Keep six on the shelf",
    "Sign out",
  ])
    expect(body, `share page shows ${secret}`).not.toContain(secret);
  await expectNoSeriousA11yViolations(pub, "public share page");
  await pub.setViewportSize({ width: 375, height: 812 });
  await pub.screenshot({ path: shot("share-phone"), fullPage: true });
  await anon.close();
});

test("the print-ready list and the phone layout pass the accessibility scan", async ({ page }) => {
  await openList(page);
  await page.getByRole("link", { name: "Print wanted list" }).click();
  await expect(page.getByRole("heading", { level: 1, name: /Parts wanted for/ })).toBeVisible();
  await expect(page.getByTestId("sheet-line").first()).toBeVisible();
  await expectNoSeriousA11yViolations(page, "print list");
  await page.emulateMedia({ media: "print" });
  await page.screenshot({ path: shot("print"), fullPage: true });
  await page.emulateMedia({ media: "screen" });
  await page.setViewportSize({ width: 375, height: 812 });
  await page.getByRole("link", { name: "← Back to the list" }).click();
  await expect(page.getByTestId("part-row").first()).toBeVisible();
  await expectNoSeriousA11yViolations(page, "wanted list on a phone");
  await page.screenshot({ path: shot("list-phone"), fullPage: true });
});

test("a viewer reads the list but gets no editing or sharing controls", async ({ page }) => {
  await signIn(page, "viewer");
  await page.goto(page.url().replace(/\/sites\/([^/]+).*/, "/sites/$1/parts"));
  await expect(page.getByTestId("part-row").first()).toBeVisible();
  await expect(page.getByText("Add a part by hand")).toHaveCount(0);
  await expect(page.getByRole("button", { name: "Create share link" })).toHaveCount(0);
});

test("the curator sets a line's heritage rule and its working notes, each saved from the version shown", async ({
  page,
}) => {
  await signIn(page, "curator");
  await page.goto(page.url().replace(/\/sites\/([^/]+).*/, "/sites/$1/parts"));
  await page.getByTestId("part-row").getByRole("link").first().click();
  const rule = page.getByLabel("Heritage rule (curator)");
  const other = (await rule.inputValue()) === "modern_ok" ? "period_ok" : "modern_ok";
  await rule.selectOption(other);
  await page.getByRole("button", { name: "Set rule" }).click();
  await expect(page.getByText("Heritage rule saved.")).toBeVisible();
  await expect(rule).toHaveValue(other);

  const notes = page.getByRole("form", { name: "Working notes" });
  const text = `Ask the harbour trust's store first (${Date.now()})`;
  await notes.getByLabel("Internal notes (never shared)").fill(text);
  await notes.getByLabel("Extra quantity (spares)").fill("1");
  await notes.getByRole("button", { name: "Save" }).click();
  await expect(notes.getByText("Saved.")).toBeVisible();
  await expect(notes.getByLabel("Internal notes (never shared)")).toHaveValue(text);
});
