import { expect, test, type Page } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";

const MAIN = "Main switchboard (engine room, aft)";

async function openMainBoard(page: Page) {
  await page.getByRole("link", { name: "Readings", exact: true }).first().click();
  await expect(page.getByRole("heading", { level: 1, name: "Test readings" })).toBeVisible();
  await page.getByRole("link", { name: new RegExp(MAIN.replace(/[()]/g, "\\$&")) }).click();
  await expect(page.getByRole("heading", { level: 1, name: `Readings · ${MAIN}` })).toBeVisible();
}

test("a volunteer records three insulation readings on different days and temperatures and sees corrected values, verdicts and the chart", async ({
  page,
}) => {
  test.setTimeout(120_000); // three saves, a chart and an accessibility scan on a shared, loaded machine
  const circuit = `Test feeder ${Date.now().toString(36)}`;
  await signIn(page, "volunteer");
  await openMainBoard(page);
  await expect(page.getByRole("note", { name: "Safety notice" }).first()).toBeVisible();
  // One caution on the page: the ground-lamp card leaves its own out under the page's (it keeps it on the board).
  await expect(page.getByRole("heading", { name: "Latest ground-lamp check" })).toBeVisible();
  await expect(page.getByRole("note", { name: "Safety notice" })).toHaveCount(1);
  const form = page.getByRole("form", { name: "Record an insulation-resistance reading" });
  // NETA Table 100.14 solid multipliers (from memory, see tests/domain): 10 °C 0.63, 20 °C 1.00, 30 °C 1.58.
  // ANSI/NETA MTS-2019 Table 100.1: a 450 V board uses the 600 V row, minimum 100 MΩ.
  const rows = [
    {
      when: "2026-11-25T08:00",
      megohms: "40",
      temp: "10",
      corrected: "25.2 MΩ corrected to 20 °C",
      verdict: "Below the recorded minimum",
    },
    {
      when: "2026-11-26T08:00",
      megohms: "45",
      temp: "20",
      corrected: "45 MΩ corrected to 20 °C",
      verdict: "Below the recorded minimum",
    },
    {
      when: "2026-11-27T08:00",
      megohms: "70",
      temp: "30",
      corrected: "111 MΩ corrected to 20 °C",
      verdict: "Meets the recorded criterion",
    },
  ];
  for (const r of rows) {
    await form.getByLabel("Component").selectOption({ label: "No component: name the circuit" });
    await form.getByLabel("Circuit", { exact: true }).fill(circuit);
    await form.getByLabel("Reading (MΩ)").fill(r.megohms);
    await form.getByLabel("Equipment temperature (°C)").fill(r.temp);
    await form.getByLabel("Measured at").fill(r.when);
    await form.getByRole("button", { name: "Save reading" }).click();
    const saved = page.getByRole("status").filter({ hasText: "Saved:" });
    await expect(saved).toContainText(r.corrected);
    await expect(saved).toContainText(r.verdict);
  }
  const more = page.getByRole("button", { name: /^Show all \d+ readings$/ });
  if (await more.isVisible()) await more.click();
  const mine = page.getByTestId("insulation-reading").filter({ hasText: circuit });
  await expect(mine).toHaveCount(3);
  await expect(mine.first().getByTestId("corrected")).toHaveText("111 MΩ at 20 °C");
  await mine.first().getByText("Source").click();
  await expect(mine.first().getByText("ANSI/NETA MTS-2019 Table 100.1")).toBeVisible();
  // Only A–G was measured: the comparison says which phases were not, not "nothing flagged" as if all were fine.
  const compared = page
    .getByRole("list", { name: "Phase comparisons" })
    .getByTestId("phase-comparison")
    .filter({ hasText: circuit });
  await expect(compared.getByTestId("phase-missing")).toHaveText(
    "Not measured: B–G, C–G. One phase alone is not compared with the others.",
  );

  await page.getByLabel("Component or circuit").selectOption({ label: `${circuit} (3)` });
  const chart = page.getByTestId("dry-out-chart");
  await expect(chart.locator("svg.recharts-surface")).toBeVisible();
  await expect(chart.getByText("Minimum 100 MΩ")).toBeVisible();
  await expect(chart.getByTestId("forecast-words")).toContainText("reaches the 100 MΩ minimum");
  await expectNoSeriousA11yViolations(page, "board readings page");
});

test("a ground-lamp check with one dark lamp names the phase and shows on the latest check", async ({ page }) => {
  await signIn(page, "volunteer");
  await openMainBoard(page);
  await page.getByRole("group", { name: "Kind of reading" }).getByRole("button", { name: "Ground lamps" }).click();
  const form = page.getByRole("form", { name: "Record a ground-lamp check" });
  await form.getByLabel("Energisation").fill("Section B feeders closed one by one");
  await form.getByRole("group", { name: "Phase C lamp" }).getByLabel("Dark").check();
  await form.getByRole("button", { name: "Save lamp check" }).click();
  const words = "Phase C lamp dark, A and B bright: suspect a ground on phase C — on a vessel, a fault to the hull.";
  await expect(page.getByRole("status").filter({ hasText: words })).toBeVisible();
  const latest = page.getByRole("region", { name: "Latest ground-lamp check" });
  await expect(latest.getByTestId("ground-words")).toHaveText(words);
  await expect(latest.getByText("Section B feeders closed one by one")).toBeVisible();
});

test("a viewer reads the readings without record forms; the criteria page and a component page pass the scan", async ({
  page,
}) => {
  test.setTimeout(120_000); // two accessibility scans on a shared, loaded machine
  await signIn(page, "viewer");
  await openMainBoard(page);
  await expect(page.getByRole("heading", { name: "Record a reading" })).toHaveCount(0);
  // 6.5 °C over a similar lug at 65 % load: level 2 as measured, level 4 scaled to rated load (ΔT ∝ I²).
  await expect(page.getByText("Level 4 of 4").first()).toBeVisible();
  await expect(page.getByTestId("thermal-scaled").filter({ hasText: "level 4" }).first()).toBeVisible();
  await expect(page.getByText("▲ High").first()).toBeVisible();
  await page.getByRole("navigation", { name: "Components with readings" }).getByRole("link", { name: "G1" }).click();
  await expect(page.getByRole("heading", { level: 1, name: /G1/ })).toBeVisible();
  await expectNoSeriousA11yViolations(page, "component readings page");
  await page.goto(page.url().replace(/\/components\/.*$/, "/criteria"));
  await expect(page.getByRole("heading", { level: 1, name: "Reading criteria" })).toBeVisible();
  await expect(page.getByRole("button", { name: "Save criteria" })).toBeDisabled();
  await expectNoSeriousA11yViolations(page, "criteria page");
});

test("the curator sees the readings home and criteria with the table source; both pass the scan", async ({ page }) => {
  await signIn(page, "curator");
  await page.getByRole("link", { name: "Readings", exact: true }).first().click();
  await expectNoSeriousA11yViolations(page, "readings home");
  await page.getByRole("link", { name: "Criteria the readings are judged against" }).click();
  await expect(page.getByRole("button", { name: "Save criteria" })).toBeEnabled();
  await page.getByText("Default minimums: ANSI/NETA MTS-2019 Table 100.1").click();
  await expect(page.getByRole("cell", { name: "600 V", exact: true })).toBeVisible();
});

test("an impossible reading is refused with a message beside the field, and nothing is saved", async ({ page }) => {
  await signIn(page, "volunteer");
  await openMainBoard(page);
  const form = page.getByRole("form", { name: "Record an insulation-resistance reading" });
  await form.getByLabel("Circuit", { exact: true }).fill("Refused reading check");
  await form.getByLabel("Reading (MΩ)").fill("-5");
  await form.getByLabel("Equipment temperature (°C)").fill("20");
  await form.getByRole("button", { name: "Save reading" }).click();
  await expect(form.getByText("Reading must be at least 0 MΩ")).toBeVisible();
  await expect(form.getByLabel("Reading (MΩ)")).toHaveAttribute("aria-invalid", "true");
  await expect(page.getByTestId("insulation-reading").filter({ hasText: "Refused reading check" })).toHaveCount(0);
});

test("'Measured at' keeps to the clock while the form stays open, until the volunteer types a time", async ({
  page,
}) => {
  // The page's own clock, moved on by Playwright: a form left open at the board must not stamp the minute it opened.
  await page.clock.install({ time: new Date("2026-12-05T21:00:00") });
  await signIn(page, "volunteer");
  await openMainBoard(page);
  const form = page.getByRole("form", { name: "Record an insulation-resistance reading" });
  const when = form.getByLabel("Measured at");
  await expect(when).toHaveValue(/^2026-12-05T21:0\d$/);
  await page.clock.fastForward("12:00");
  await expect(when).toHaveValue(/^2026-12-05T21:1\d$/);
  // Typed by hand, it stays as typed.
  await when.fill("2026-12-05T18:30");
  await page.clock.fastForward("05:00");
  await expect(when).toHaveValue("2026-12-05T18:30");
});
