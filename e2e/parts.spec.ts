import { readFileSync } from "node:fs";
import Papa from "papaparse";
import { expect, request, test } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { DEMO_PASSWORD, signIn } from "./support/auth";

const shot = (name: string) => `/tmp/parts-${name}.png`;
/** The reference order for names with numbers: ICU's numeric collation as the browser's engine has it (ECMA-402). */
const byValue = new Intl.Collator("und", { numeric: true }).compare;

/**
 * What scrolls sideways on the page: the page itself (document.scrollingElement), or any box on it that scrolls its
 * content sideways (overflow-x auto or scroll with more content than width), named by tag and test id.
 */
async function sidewaysScrollers(page: import("@playwright/test").Page) {
  return page.evaluate(() => {
    const doc = document.scrollingElement!;
    const out = doc.scrollWidth > doc.clientWidth ? [`page ${doc.scrollWidth} > ${doc.clientWidth}`] : [];
    for (const el of document.querySelectorAll<HTMLElement>("body *")) {
      const o = getComputedStyle(el).overflowX;
      if ((o === "auto" || o === "scroll") && el.scrollWidth > el.clientWidth + 1)
        out.push(
          `${el.tagName.toLowerCase()}${el.dataset.testid ? `[${el.dataset.testid}]` : ""} ${el.scrollWidth} > ${el.clientWidth}`,
        );
    }
    return out;
  });
}

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
  // Two scans and four full-page shots: 95 s at load 15 on the shared 2-core machine (each scan 10–20 s there).
  test.setTimeout(180_000);
  await openList(page);
  await page.getByRole("link", { name: "Print wanted list" }).click();
  await expect(page.getByRole("heading", { level: 1, name: /Parts wanted for/ })).toBeVisible();
  await expect(page.getByTestId("sheet-line").first()).toBeVisible();
  await expectNoSeriousA11yViolations(page, "print list");
  await page.emulateMedia({ media: "print" });
  await page.screenshot({ path: shot("print"), fullPage: true });
  await page.emulateMedia({ media: "screen" });
  // A phone: nothing scrolls sideways, neither the page nor the list; each line is a card.
  await page.setViewportSize({ width: 360, height: 780 });
  await expect(page.getByTestId("sheet-line").first()).toBeVisible();
  expect(await sidewaysScrollers(page), "print sheet at 360 px").toEqual([]);
  await page.screenshot({ path: shot("print-phone"), fullPage: true });
  await page.getByRole("link", { name: "← Back to the list" }).click();
  await expect(page.getByTestId("part-row").first()).toBeVisible();
  await expect(page.getByRole("list", { name: "Wanted parts" })).toBeVisible();
  expect(await sidewaysScrollers(page), "wanted list at 360 px").toEqual([]);
  await expectNoSeriousA11yViolations(page, "wanted list on a phone");
  await page.screenshot({ path: shot("list-phone"), fullPage: true });
  // The columns' sort, as two selects.
  await page.getByLabel("Sort by").selectOption("qty");
  await page.getByLabel("Direction").selectOption("desc");
  await expect(page).toHaveURL(/sort=qty/);
  await expect(page).toHaveURL(/dir=desc/);
  await expect(page.getByRole("list", { name: "Wanted parts" })).toHaveAttribute("aria-busy", "false");
  const qtys = (await page.getByTestId("part-row").allInnerTexts()).map((t) => Number(/Qty\s+(\d+)/.exec(t)?.[1]));
  expect(qtys.length).toBeGreaterThan(1);
  expect(qtys).toEqual([...qtys].sort((a, b) => b - a));
  // Back at a desktop's width the lines are a table again.
  await page.setViewportSize({ width: 1280, height: 900 });
  await expect(page.getByRole("table", { name: "Wanted parts" })).toBeVisible();
  await expect(page.getByRole("columnheader", { name: /Qty/ })).toHaveAttribute("aria-sort", "descending");
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

/**
 * A line wanted by more positions than its row carries (LINKS_IN_ROW = 4) and than the line's page reads at once
 * (LINE_LINKS_PAGE = 50): a board of 53 breakers of one
 * invented model, each set to "replace" through the API as the curator would.
 */
async function lineOfManyPositions(baseURL: string, count: number) {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: { Origin: baseURL } });
  expect(
    (await api.post("/api/auth/sign-in", { data: { email: "curator@tideline.test", password: DEMO_PASSWORD } })).ok(),
  ).toBeTruthy();
  const siteId = ((await (await api.get("/api/sites")).json()) as { sites: Array<{ id: string }> }).sites[0].id;
  const prefix = `M${Date.now().toString(36).slice(-5).toUpperCase()}-`;
  const model = `QX-${prefix}250`; // invented model (fictional yard)
  const board = await api.post(`/api/sites/${siteId}/boards`, {
    data: { name: `Shore panel ${prefix}`, nominalVolts: 450, phases: 3, gridRows: 2, gridCols: 60 },
  });
  expect(board.status()).toBe(201);
  const boardId = ((await board.json()) as { id: string }).id;
  const comps: Array<{ id: string; version: number }> = [];
  for (const [row, from, to] of [
    [1, 1, Math.min(count, 60)],
    [2, 61, count],
  ]) {
    if (to < from) continue;
    const gen = await api.post(`/api/sites/${siteId}/boards/${boardId}/positions/generate`, {
      data: { prefix, from, to, gridRow: row, startCol: 1, kind: "molded_case_breaker" },
    });
    expect(gen.status(), await gen.text()).toBe(201);
    comps.push(
      ...((await gen.json()) as { positions: Array<{ component: { id: string; version: number } }> }).positions.map(
        (p) => p.component,
      ),
    );
  }
  const decide = async (comp: { id: string; version: number }) => {
    const plate = await api.patch(`/api/sites/${siteId}/components/${comp.id}`, {
      data: { version: comp.version, maker: "Saltmarrow Switchgear (fictional)", model, ratingAmps: 250, poles: 3 },
    });
    expect(plate.status(), await plate.text()).toBe(200);
    const { version } = (await plate.json()) as { version: number };
    const decided = await api.put(`/api/sites/${siteId}/components/${comp.id}/disposition`, {
      data: { disposition: "replace", reason: "Flooded to the busbars; a whole breaker is wanted", version },
    });
    expect(decided.status(), await decided.text()).toBe(200);
  };
  // The first four to ask are positions 10, 9, 11 and 2, one after another; the rest follow eight at a time.
  const first = [10, 9, 11, 2].filter((n) => n <= comps.length);
  for (const n of first) await decide(comps[n - 1]);
  const rest = comps.filter((_, i) => !first.includes(i + 1));
  for (let i = 0; i < rest.length; i += 8) await Promise.all(rest.slice(i, i + 8).map(decide));
  await api.dispose();
  const designations = comps.map((_, i) => `${prefix}${i + 1}`);
  return { siteId, model, designations, firstFour: first.map((n) => designations[n - 1]) };
}

test("a line wanted by 53 positions: its row shows the first four and how many more, and its page reaches every one", async ({
  page,
  baseURL,
}) => {
  test.setTimeout(180_000);
  const { siteId, model, designations, firstFour } = await lineOfManyPositions(baseURL!, 53);
  await signIn(page, "scrounger");
  await page.goto(`/sites/${siteId}/parts?q=${encodeURIComponent(model)}`);
  const row = page.getByTestId("part-row");
  await expect(row).toHaveCount(1);
  await expect(row).toContainText("53"); // the quantity counts every position
  await expect(row.getByRole("listitem")).toHaveCount(5); // four positions and "+49 more"
  const more = row.getByTestId("more-positions");
  await expect(more).toHaveText("+49 more");
  // The first four to ask (10, 9, 11, 2), listed as the line's page lists them: numbers by value, 2, 9, 10, 11
  // (as text: 10, 11, 2, 9).
  const chips = (await row.getByRole("listitem").allInnerTexts()).slice(0, 4).map((t) => t.trim());
  expect(chips).toEqual([...firstFour].sort(byValue));
  expect(chips).toEqual([2, 9, 10, 11].map((n) => designations[n - 1]));
  await expectNoSeriousA11yViolations(page, "wanted list, a line of many positions");
  await page.screenshot({ path: shot("many-desktop"), fullPage: true });
  await page.setViewportSize({ width: 360, height: 780 });
  await expect(more).toBeVisible();
  expect(await row.getByRole("listitem").allInnerTexts()).toEqual([...chips, "+49 more"]);
  expect(await sidewaysScrollers(page), "a line of many positions at 360 px").toEqual([]);
  await page.screenshot({ path: shot("many-phone"), fullPage: true });

  await more.click();
  const items = page.getByTestId("line-positions").getByRole("listitem");
  await expect(items).toHaveCount(50);
  await expect(page.getByText("Showing 50 of 53")).toBeVisible();
  await page.getByRole("button", { name: "Show 3 more" }).click();
  await expect(items).toHaveCount(53);
  await expect(page.getByText("Showing 50 of 53")).toHaveCount(0);
  // Every position once, in the order of their numbers (as text, M…-10 came before M…-2).
  const shown = (await items.allInnerTexts()).map((t) => /· (\S+)/.exec(t)?.[1]);
  expect(shown).toEqual(designations);
  await expectNoSeriousA11yViolations(page, "a line's positions, all pages");
  expect(await sidewaysScrollers(page), "the line's page at 360 px").toEqual([]);
  await page.screenshot({ path: shot("many-line-phone"), fullPage: true });
  await page.setViewportSize({ width: 1280, height: 900 });
  await page.screenshot({ path: shot("many-line-desktop"), fullPage: true });
});
