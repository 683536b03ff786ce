import { expect, request, test, type Locator, type Page } from "@playwright/test";
import { DEMO_PASSWORD, signIn } from "./support/auth";

/**
 * A failing reading becomes a defect linked both ways, and the repair is
 * closed on evidence by someone other than the repairer. The board is made through the API as the
 * curator (a 450 V board: ANSI/NETA MTS-2019 Table 100.1's 600 V row, minimum 100 MΩ — from memory,
 * see tests/domain); the volunteer works on a 360 × 740 phone.
 */
async function makeBoard(baseURL: string) {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: { Origin: baseURL } });
  expect(
    (await api.post("/api/auth/sign-in", { data: { email: "curator@tideline.test", password: DEMO_PASSWORD } })).ok(),
  ).toBeTruthy();
  const siteId = ((await (await api.get("/api/sites")).json()) as { sites: Array<{ id: string }> }).sites[0].id;
  const prefix = `E${Date.now().toString(36).slice(-5).toUpperCase()}-`;
  const board = await api.post(`/api/sites/${siteId}/boards`, {
    data: { name: `Evidence board ${prefix}`, nominalVolts: 450, phases: 3, gridRows: 1, gridCols: 2 },
  });
  expect(board.status()).toBe(201);
  const boardId = ((await board.json()) as { id: string }).id;
  const gen = await api.post(`/api/sites/${siteId}/boards/${boardId}/positions/generate`, {
    data: { prefix, from: 1, to: 1, gridRow: 1, startCol: 1, kind: "molded_case_breaker" },
  });
  expect(gen.status()).toBe(201);
  await api.dispose();
  return { siteId, boardId, designation: `${prefix}1` };
}

/** Picks the option whose text matches (selectOption takes whole labels only). */
async function pickOption(select: Locator, re: RegExp) {
  let label: string | undefined;
  await expect
    .poll(async () => (label = (await select.locator("option").allTextContents()).find((t) => re.test(t))), {
      message: `an option matching ${re}`,
    })
    .toBeTruthy();
  await select.selectOption({ label: label! });
}
const fact = (page: Page, name: string) =>
  page.locator("dt", { hasText: name }).locator("xpath=following-sibling::dd[1]");

async function recordInsulation(page: Page, designation: string, megohms: string, when: string) {
  const form = page.getByRole("form", { name: "Record an insulation-resistance reading" });
  await pickOption(form.getByLabel("Component"), new RegExp(`^${designation}( · |$)`));
  await form.getByLabel("Reading (MΩ)").fill(megohms);
  await form.getByLabel("Equipment temperature (°C)").fill("20");
  await form.getByLabel("Measured at").fill(when);
  await form.getByRole("button", { name: "Save reading" }).click();
  return page.getByRole("status").filter({ hasText: "Saved:" });
}

test.describe("on a 360 px phone", () => {
  test.setTimeout(180_000);
  test.use({ viewport: { width: 360, height: 740 } });

  test("a volunteer raises a defect from a low insulation reading and repairs it; only someone else closes it, and only on a passing re-test", async ({
    page,
    baseURL,
  }) => {
    const b = await makeBoard(baseURL!);
    const title = `Low insulation on ${b.designation} after the flood`;

    // The volunteer records a reading below the minimum and raises a defect from it, prefilled.
    await signIn(page, "volunteer");
    await page.goto(`/sites/${b.siteId}/readings/boards/${b.boardId}`);
    const low = await recordInsulation(page, b.designation, "4", "2026-11-20T08:00");
    await expect(low).toContainText("Below the recorded minimum");
    const reading = page.getByTestId("insulation-reading").filter({ hasText: "4 MΩ" }).first();
    await reading.getByRole("link", { name: "Raise a defect from this reading" }).click();
    await expect(page.getByRole("heading", { level: 1, name: "Raise a defect" })).toBeVisible();
    await expect(page.getByTestId("from-reading")).toContainText("the defect and the reading will link to each other");
    await expect(page.getByLabel("Category")).toHaveValue("insulation");
    await page.getByLabel("What is wrong").fill(title);
    await page.getByRole("button", { name: "Raise the defect" }).click();
    await expect(page.getByRole("heading", { level: 1, name: title })).toBeVisible();
    const evidence = page.getByTestId("evidence");
    const defectUrl = page.url();
    const head = page.locator("header", { has: page.getByRole("heading", { level: 1 }) });
    const ref = (await head.locator("p.font-mono").textContent())!.trim();
    expect(ref).toMatch(/^D-\d+$/);

    // The register lists it, and the reading names the defect it raised.
    await page.goto(`/sites/${b.siteId}/defects?q=${encodeURIComponent(b.designation)}`);
    // On a phone the register is cards (src/features/defects/components/register-table.tsx).
    const card = page.getByTestId("defect-card").filter({ hasText: title });
    await expect(card.getByRole("link", { name: ref, exact: true })).toBeVisible();
    await expect(card.locator('[data-status="raised"]')).toHaveText(/Raised/);
    await page.goto(`/sites/${b.siteId}/readings/boards/${b.boardId}`);
    await expect(
      page.getByTestId("insulation-reading").filter({ hasText: "4 MΩ" }).first().getByTestId("reading-defects"),
    ).toContainText(`${ref} raised from this reading (Raised)`);

    // The volunteer takes it through the repair; as the repairer they are offered no close.
    await page.goto(defectUrl);
    await expect(evidence).toContainText("Raised from: Insulation 4 MΩ");
    await expect(evidence).toContainText("below the minimum");
    await page.getByRole("button", { name: "Start the repair" }).click();
    await page.getByRole("button", { name: "Repair done: ready for re-test" }).click();
    await expect(page.getByTestId("repairer-note")).toHaveText(
      "You did this repair, so you cannot close it: someone else checks the re-test and closes it.",
    );
    await expect(page.getByRole("button", { name: "Re-tested: close" })).toHaveCount(0);
    await expect(fact(page, "Repaired by")).toHaveText("Tobias Quell");

    // The curator, on the same phone, sees the close but cannot use it until evidence is linked.
    await page.getByRole("button", { name: "Sign out" }).click();
    await signIn(page, "curator");
    await page.goto(defectUrl);
    // The assignment picker offers only people whose role does repair work (item: no viewer as assignee).
    const assignees = page.getByLabel("Assigned to").locator("option");
    await expect(assignees).toContainText(["Nobody", "Ines Marrow · curator", "Tobias Quell · volunteer"]);
    await expect(assignees.filter({ hasText: /Pell Arbuthnot|Ada Fenwright|Rufus Lade/ })).toHaveCount(0);
    const close = page.getByRole("button", { name: "Re-tested: close" });
    await expect(close).toBeVisible();
    await expect(close).toBeDisabled();
    await expect(page.getByTestId("close-needs")).toHaveText(
      "Cannot close yet: nothing proves the repair. Link a re-test reading that meets its criterion, or file an after-work photo, under “Evidence of the repair”.",
    );

    // A re-test still below the minimum is not evidence; one meeting the criterion is.
    await page.goto(`/sites/${b.siteId}/readings/boards/${b.boardId}`);
    await expect(await recordInsulation(page, b.designation, "30", "2026-11-24T08:00")).toContainText(
      "Below the recorded minimum",
    );
    await expect(await recordInsulation(page, b.designation, "600", "2026-11-26T08:00")).toContainText(
      "Meets the recorded criterion",
    );
    await page.goto(defectUrl);
    const pick = evidence.getByLabel("Link a re-test reading of this component");
    await pickOption(pick, / 30 MΩ/);
    await evidence.getByRole("button", { name: "Link as re-test" }).click();
    await expect(evidence).toContainText("Re-test: Insulation 30 MΩ");
    await expect(close).toBeDisabled();
    await pickOption(pick, / 600 MΩ/);
    await evidence.getByRole("button", { name: "Link as re-test" }).click();
    await expect(evidence).toContainText("Re-test: Insulation 600 MΩ");
    await expect(page.getByTestId("close-needs")).toHaveText(
      "Evidence is linked (1 re-test meeting the criterion). Closing records you as the one who verified it.",
    );
    await expect(close).toBeEnabled();
    await close.click();
    await expect(head).toContainText("Closed");
    // Settled, it ranks after all open work whatever its points (src/domain/priority.ts).
    await expect(page.getByRole("region", { name: "Why it ranks here" })).toContainText(
      "— closed, so after all open work.",
    );
    await expect(fact(page, "Verified by")).toHaveText("Ines Marrow");
    await expect(page.getByTestId("repairer-note")).toHaveCount(0);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360);
  });
});
