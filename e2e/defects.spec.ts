import { expect, test, type Page } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";

async function openRegister(page: Page) {
  await page.getByRole("link", { name: "Defects", exact: true }).first().click();
  await expect(page.getByRole("heading", { level: 1, name: "Defect register" })).toBeVisible();
  await expect(page.getByRole("status").filter({ hasText: /Showing/ })).toBeVisible();
  // The count can show a render before the rows (cards on a phone) are drawn: every caller uses them next.
  await expect(page.locator("tbody tr[data-index], [data-testid=defect-card]").first()).toBeAttached();
}
/** "" when the register's rows are in the Due column's shown order with blanks last; else what is wrong. */
async function dueOrderProblem(page: Page): Promise<string> {
  const dueAt = (await page.locator("thead th").allInnerTexts()).findIndex((h) => h.trim().startsWith("Due"));
  // Every row of the page is drawn.
  const dues = (await page.locator(`tbody tr[data-index] td:nth-child(${dueAt + 1})`).allInnerTexts()).map((d) =>
    d.trim(),
  );
  const dated = dues.filter((d) => d !== "—");
  const ascending = [...dated].sort();
  const dir = await page.getByRole("columnheader", { name: /Due/ }).getAttribute("aria-sort");
  const expected = dir === "descending" ? ascending.reverse() : ascending;
  const ok = dueAt >= 0 && dues.length > 0 && dues.slice(0, dated.length).join() === expected.join();
  return ok ? "" : `${dir}: ${dues.join(" ")}`;
}

const refs = (page: Page) => page.locator("tbody a[data-row-link]").allInnerTexts();

test("a cold start of the register asks the server for each read once", async ({ page, context, browser }) => {
  await signIn(page, "curator");
  await openRegister(page);
  const register = new URL(page.url()).pathname;
  // A new browser with the same session and nothing kept on the phone yet (no IndexedDB, no service worker).
  const cold = await browser.newContext({ storageState: { cookies: await context.cookies(), origins: [] } });
  const fresh = await cold.newPage();
  const asked: string[] = [];
  fresh.on("request", (r) => {
    const u = new URL(r.url());
    if (u.pathname.startsWith("/api/") && u.pathname !== "/api/health") asked.push(u.pathname);
  });
  await fresh.goto(register);
  await expect(fresh.getByRole("status").filter({ hasText: /Showing/ })).toBeVisible();
  await fresh.waitForLoadState("networkidle");
  const times = (path: string) => asked.filter((a) => a === path).length;
  // Started by the entry as the page starts (src/app/router.tsx `reads`), taken up by the page, not asked again
  // once the kept reads are restored (src/app/provider.tsx `restoredFromPhone`).
  expect(times("/api/session"), asked.join("\n")).toBe(1);
  expect(times(register.replace(/^\/sites/, "/api/sites").replace(/\/defects$/, "")), asked.join("\n")).toBe(1);
  expect(times(`/api${register}`), asked.join("\n")).toBe(1);
  expect(times(`/api${register}/options`), asked.join("\n")).toBe(1);
  await cold.close();
});

test("the curator filters and sorts the register, and a shared link opens the same view", async ({ page, context }) => {
  await signIn(page, "curator");
  await openRegister(page);
  await page.locator("summary", { hasText: "Severity" }).click();
  // the box is controlled by the URL, which the router updates a moment after the click
  await page.getByRole("checkbox", { name: "4 · Disabling" }).click();
  await expect(page).toHaveURL(/severity=disabling/);
  await expect(page.getByRole("checkbox", { name: "4 · Disabling" })).toBeChecked();
  await page.locator("summary", { hasText: "Severity" }).click();
  await page.getByRole("button", { name: /^Due/ }).click();
  await expect(page).toHaveURL(/sort=dueOn/);
  await expect(page.getByRole("columnheader", { name: /Due/ })).toHaveAttribute("aria-sort", /ascending|descending/);
  // The rows themselves are in due-date order (blanks last), not only the URL and the header.
  await expect.poll(() => dueOrderProblem(page)).toBe("");
  const badges = await page
    .locator("tbody")
    .getByText(/4 · Disabling/)
    .count();
  expect(badges).toBe(await page.locator("tbody tr[data-index]").count());
  const mine = await refs(page);
  expect(mine.length).toBeGreaterThan(0);
  const shared = await context.newPage();
  await shared.goto(page.url());
  await expect(shared.getByRole("status").filter({ hasText: /Showing/ })).toBeVisible();
  // its rows are drawn a render after the page around them
  await expect.poll(() => refs(shared)).toEqual(mine);
  await expect(shared.getByRole("columnheader", { name: /Due/ })).toHaveAttribute("aria-sort", /ascending|descending/);
  await expectNoSeriousA11yViolations(page, "defect register");
  await page.getByRole("link", { name: "How priority works" }).click();
  await expect(page.getByRole("heading", { level: 1, name: "How priority works" })).toBeVisible();
  await expect(page.getByText("Safety-critical: +40")).toBeVisible();
  await expectNoSeriousA11yViolations(page, "priority help page");
});

test("an empty filter result says what to do", async ({ page }) => {
  await signIn(page, "viewer");
  await openRegister(page);
  await page.getByLabel("Search title, notes, position or D-number").fill("no-such-defect-anywhere");
  await expect(page.getByText("No defect matches these filters")).toBeVisible();
  await expect(page.getByRole("link", { name: "Raise a defect" })).toHaveCount(0);
  await page.getByRole("button", { name: "Clear the filters to see every defect." }).click();
  await expect(page.getByRole("status").filter({ hasText: /Showing/ })).toBeVisible();
});

test("the register moves between rows with the arrow keys", async ({ page }) => {
  await signIn(page, "curator");
  await openRegister(page);
  const links = page.locator("tbody a[data-row-link]");
  await links.first().focus();
  await page.keyboard.press("ArrowDown");
  await expect(links.nth(1)).toBeFocused();
  await page.keyboard.press("x");
  await expect(page.getByText("1 selected")).toBeVisible();
  // Every row of the page is drawn, past the box's view too (the browser's find and a screen reader see them all);
  // End reaches the page's last row, Home the first.
  const table = page.getByRole("table");
  const total = Number(await table.getAttribute("aria-rowcount"));
  const shown = Math.min(total, 25);
  await expect(page.locator("tbody tr[data-index]")).toHaveCount(shown);
  await page.keyboard.press("End");
  await expect(page.locator("tbody tr:focus-within")).toHaveAttribute("aria-rowindex", String(shown + 1));
  await expect(page.locator("tbody tr:focus-within")).toBeInViewport();
  await page.keyboard.press("Home");
  await expect(page.locator("tbody tr:focus-within")).toHaveAttribute("aria-rowindex", "2");
  await expect(links.first()).toBeFocused();
});

test("the curator places a defect after another with a reason and the order shows with its reason", async ({
  page,
}) => {
  await signIn(page, "curator");
  await openRegister(page);
  // The count can show before the rows are drawn: read the refs once the rows are there.
  await expect(page.locator("tbody a[data-row-link]").nth(1)).toBeAttached();
  const all = await refs(page);
  const target = all[1];
  // The 14th row, reached with the keyboard: below the box's view, so the box scrolls to it on the way. In
  // the demo's ranked order it is neither pinned nor pinned against (the 13th, D-6, is a pin's target: a pin there
  // is refused, pins do not chain).
  await page.locator("tbody a[data-row-link]").first().focus();
  for (let i = 0; i < 13; i++) await page.keyboard.press("ArrowDown");
  await expect(page.locator("tbody tr:focus-within")).toHaveAttribute("aria-rowindex", "15");
  await page.keyboard.press("Enter");
  await expect(page.getByRole("heading", { name: "Why it ranks here" })).toBeVisible();
  const reason = `Same enclosure is open (${Date.now()})`;
  await page.getByLabel("Do it").selectOption("below");
  await page.getByLabel("defect", { exact: true }).fill(target);
  await page.getByLabel("because").fill(reason);
  await page.getByRole("button", { name: "Set the order", exact: true }).click();
  await expect(page.getByText(`Reason: ${reason}`)).toBeVisible();
  await expect(page.getByText(new RegExp(`Placed after ${target} by Ines Marrow`))).toBeVisible();
  await expectNoSeriousA11yViolations(page, "defect page");
  await page.getByRole("button", { name: "Back to its score's place" }).click();
  await expect(page.getByText("(lifted)").first()).toBeVisible();
});

test("a volunteer raises a prefilled defect, sees no curator's order form, and cannot use bulk actions", async ({
  page,
}) => {
  await signIn(page, "volunteer");
  await page.waitForURL(/\/sites\/[^/]+/);
  const siteUrl = page.url().match(/\/sites\/[^/]+/)![0];
  await page.goto(`${siteUrl}/defects/new?category=corrosion&severity=degraded`);
  await expect(page.getByRole("heading", { name: "Raise a defect" })).toBeVisible();
  await expect(page.getByLabel("Category")).toHaveValue("corrosion");
  await expect(page.getByRole("radio", { name: /2 · Degraded/ })).toBeChecked();
  await expect(page.getByText("Cannot do its job or stops its section being brought back")).toBeVisible();
  await expectNoSeriousA11yViolations(page, "raise-a-defect form");
  await page.getByLabel("What is wrong").fill("Green verdigris on the neutral bar");
  await page.getByRole("button", { name: "Raise the defect" }).click();
  await expect(page.getByRole("heading", { level: 1, name: "Green verdigris on the neutral bar" })).toBeVisible();
  await expect(page.getByRole("button", { name: "Start the repair" })).toBeVisible();
  // blank effort counts as 8 h (−25); 1 h costs −8 (src/domain/priority.ts)
  await expect(page.getByRole("row", { name: /Effort not estimated/ })).toContainText("-25");
  await page.getByRole("button", { name: "Edit the details" }).click();
  await page.getByLabel("Effort (hours)").fill("1");
  await page.getByRole("button", { name: "Save" }).click();
  await expect(page.getByRole("row", { name: /Effort 1 h/ })).toContainText("-8");
  await expect(page.getByLabel("because")).toHaveCount(0);
  await expect(page.getByRole("button", { name: "Set the order", exact: true })).toHaveCount(0);
  await page.goto(`${siteUrl}/defects`);
  await expect(page.getByRole("status").filter({ hasText: /Showing/ })).toBeVisible();
  // Selection serves the bulk actions a volunteer does not have: no boxes that do nothing.
  await expect(page.locator("tbody tr").first()).toBeVisible();
  await expect(page.locator("tbody input[type=checkbox]")).toHaveCount(0);
  await expect(page.getByRole("button", { name: "Apply…" })).toHaveCount(0);
});

test("the curator bulk-assigns with one confirmation; the repair plan prints by section with totals", async ({
  page,
}) => {
  await signIn(page, "curator");
  await openRegister(page);
  await page.goto(page.url() + "?status=raised&sort=ref&dir=desc");
  await expect(page.getByRole("status").filter({ hasText: /Showing/ })).toBeVisible();
  const boxes = page.locator("tbody input[type=checkbox]");
  await boxes.nth(0).check();
  await boxes.nth(1).check();
  await page.getByLabel("Assign to").selectOption({ label: "Tobias Quell · volunteer" });
  await page.getByRole("button", { name: "Apply…" }).click();
  await page.getByRole("button", { name: "Yes, change 2" }).click();
  await expect(page.getByText("2 selected")).toHaveCount(0);
  await expect(page.locator("tbody tr").nth(0)).toContainText("Tobias Quell");
  await page.getByRole("link", { name: "Repair plan" }).first().click();
  await expect(page.getByRole("heading", { level: 1, name: /Repair plan/ })).toBeVisible();
  await expect(page.getByText("Section total").first()).toBeVisible();
  await expectNoSeriousA11yViolations(page, "repair plan");
  await page.emulateMedia({ media: "print" });
  await expect(page.getByRole("button", { name: "Print the plan" })).toBeHidden();
});

test.describe("on a phone", () => {
  test.use({ viewport: { width: 360, height: 740 } });

  test("the register is cards read top to bottom, sorted by two selects, selectable for a bulk change", async ({
    page,
  }) => {
    await signIn(page, "curator");
    await openRegister(page);
    const cards = page.getByRole("list", { name: "Defects" }).getByTestId("defect-card");
    await expect(cards.first()).toBeVisible();
    // One layout: no table, no column menu or keyboard hint (they belong to the table), nothing wider than the screen.
    await expect(page.getByRole("table")).toHaveCount(0);
    await expect(page.getByRole("button", { name: /Columns/ })).toHaveCount(0);
    await expect(page.getByText(/Keys: ↑ ↓/)).toHaveCount(0);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360);
    // Each card names its defect, its place and its standing.
    const first = cards.first();
    await expect(first.getByRole("link", { name: /^D-\d+$/ })).toBeVisible();
    for (const label of ["Board", "Position", "Due", "Assignee"])
      await expect(first.getByText(label, { exact: true })).toBeVisible();

    // One change straight after the other: each is merged into the view as it is then, so both hold.
    await page.getByLabel("Sort by").selectOption({ label: "Due" });
    await page.getByLabel("Direction").selectOption("asc");
    await expect(page).toHaveURL(/sort=dueOn/);
    await expect(page).toHaveURL(/dir=asc/);
    await expect(page.getByLabel("Sort by")).toHaveValue("dueOn");
    // The cards come in due-date order, earliest first, the undated after them.
    await expect
      .poll(async () => {
        const dues = (
          await cards.evaluateAll((els) =>
            els.map((el) => {
              const dt = [...el.querySelectorAll("dt")].find((d) => d.textContent === "Due");
              return dt?.nextElementSibling?.textContent?.trim() ?? "?";
            }),
          )
        ).filter((d) => d !== "?");
        const dated = dues.filter((d) => d !== "—");
        const inOrder =
          dated.join() === [...dated].sort().join() && dues.slice(0, dated.length).join() === dated.join();
        return dues.length > 0 && dated.length > 0 && inOrder;
      })
      .toBe(true);

    await page
      .getByRole("checkbox", { name: /^Select D-\d+$/ })
      .nth(0)
      .check();
    await page
      .getByRole("checkbox", { name: /^Select D-\d+$/ })
      .nth(1)
      .check();
    await expect(page.getByText("2 selected")).toBeVisible();
    // A filter's choices open inside the screen's width, even from a button near its right edge.
    for (const name of ["Board", "Status"]) {
      await page.locator("summary", { hasText: name }).first().click();
      const box = await page.locator("details[open] fieldset").boundingBox();
      expect(box && box.x >= 0 && box.x + box.width <= 360).toBe(true);
      await page.locator("summary", { hasText: name }).first().click();
    }
    await expectNoSeriousA11yViolations(page, "defect register on a phone");
    await page.screenshot({ path: ".data/test-results/register-cards-360.png" });
  });

  test("the repair plan's sheet is items in the site's order; printed, it is the table", async ({ page }) => {
    await signIn(page, "curator");
    await openRegister(page);
    await page.goto(page.url().replace(/\/defects.*$/, "/repair-plan"));
    const items = page.getByTestId("plan-item");
    await expect(items.first()).toBeVisible();
    // Within a section the places in the site's order rise from item to item.
    const first = page.getByRole("main").locator("section[aria-label] ol").first();
    const ranks = await first
      .getByTestId("plan-item")
      .evaluateAll((els) => els.map((el) => Number(/#(\d+)/.exec(el.querySelector("p")?.textContent ?? "")?.[1])));
    expect(ranks.length).toBeGreaterThan(1);
    expect(ranks.every((r) => r > 0)).toBe(true);
    expect(ranks).toEqual([...ranks].sort((a, b) => a - b));
    await expect(page.locator(".plan-sheet table")).toHaveCount(0);
    // The totals per board and section fit the screen: nothing to scroll sideways.
    const totals = page.getByRole("table", { name: "Open work per board and section" });
    expect(
      await totals.evaluate((t) => t.parentElement!.scrollWidth - t.parentElement!.clientWidth),
    ).toBeLessThanOrEqual(1);
    await expectNoSeriousA11yViolations(page, "repair plan on a phone");
    await page.emulateMedia({ media: "print" });
    await expect(page.locator(".plan-sheet table").first()).toBeVisible();
    await expect(items).toHaveCount(0);
  });
});
