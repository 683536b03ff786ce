import { expect, request, test, type Page } from "@playwright/test";
import sharp from "sharp";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { DEMO_PASSWORD, signIn } from "./support/auth";

/**
 * Custody follows the tag-and-return chain. Each test makes its own small board
 * through the API as the curator; the volunteer works on a 360 × 740 phone.
 */
async function makeBreaker(baseURL: string) {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: { Origin: baseURL } });
  expect(
    (await api.post("/api/auth/sign-in", { data: { email: "curator@tideline.test", password: DEMO_PASSWORD } })).ok(),
  ).toBeTruthy();
  const siteId = ((await (await api.get("/api/sites")).json()) as { sites: Array<{ id: string }> }).sites[0].id;
  const prefix = `C${Date.now().toString(36).slice(-5).toUpperCase()}-`;
  const board = await api.post(`/api/sites/${siteId}/boards`, {
    data: { name: `Chain board ${prefix}`, gridRows: 2, gridCols: 4 },
  });
  const boardId = ((await board.json()) as { id: string }).id;
  const gen = await api.post(`/api/sites/${siteId}/boards/${boardId}/positions/generate`, {
    data: { prefix, from: 1, to: 1, gridRow: 1, startCol: 1, kind: "molded_case_breaker" },
  });
  expect(gen.status()).toBe(201);
  await api.dispose();
  return { siteId, boardId, designation: `${prefix}1` };
}

async function openInQuickLog(page: Page, designation: string) {
  await page.getByRole("navigation", { name: "Site (phone)" }).getByRole("link", { name: "Quick log" }).click();
  await page.getByLabel("Designation or tag number").fill(designation);
  await page
    .getByRole("list", { name: "Matching positions" })
    .getByRole("button", { name: new RegExp(designation) })
    .click();
  await expect(page.getByTestId("log-designation")).toHaveText(designation);
  await page.getByRole("tab", { name: "Move the part" }).click();
}
const noSidewaysScroll = async (page: Page) =>
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
    await page.evaluate(() => window.innerWidth),
  );

test.describe("on a 360 px phone", () => {
  test.setTimeout(150_000);
  test.use({ viewport: { width: 360, height: 740 } });

  test("a volunteer tags a part off with a generated tag, photographs the move, and cannot refit it from the workshop", async ({
    page,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    await signIn(page, "volunteer");
    await openInQuickLog(page, m.designation);

    await expect(page.getByTestId("custody-proposal")).toContainText("Next on the chain: Removed (tagged)");
    await expect(page.getByRole("button", { name: "Removed (tagged)", exact: true })).toHaveAttribute(
      "aria-pressed",
      "true",
    );
    await page.getByRole("button", { name: "Generate a tag" }).click();
    await expect(page.getByLabel("Tag number on the bag")).toHaveValue(/^T-\d{4}$/);
    await page.getByLabel("Where is it now?").fill("Crate B, engine-room flat");
    await page.getByRole("button", { name: "Save move: Removed (tagged)" }).click();
    await expect(page.getByTestId("logged")).toContainText("Move saved — now Removed (tagged)");

    // the move's photo, from the phone's camera input
    const shot = await sharp({ create: { width: 320, height: 240, channels: 3, background: "#5a6b7a" } })
      .jpeg()
      .toBuffer();
    await page
      .getByRole("region", { name: "Photos of this move" })
      .locator("input[type=file]")
      .setInputFiles({ name: "bagged.jpg", mimeType: "image/jpeg", buffer: shot });
    await expect(
      page.getByRole("region", { name: "Photos of this move" }).getByRole("button", { name: /^Open photo/ }),
    ).toHaveCount(1);

    // the form now proposes the next step, not the previous one
    await expect(page.getByTestId("custody-proposal")).toContainText("Next on the chain: In workshop");
    await page.getByRole("button", { name: "Save move: In workshop" }).click();
    await expect(page.getByTestId("custody-now")).toHaveText("In workshop");

    await page.getByRole("button", { name: /^Refitted/ }).click();
    const needs = page.getByTestId("custody-refusals");
    await expect(needs).toContainText("refitted only from “ready to refit”");
    await expect(needs).toContainText("disposition is not decided");
    await expect(needs).toContainText("insulation-resistance reading");
    await expect(needs).toContainText("The curator can release it with a written reason.");
    await expect(page.getByRole("button", { name: /Save move: Refitted/ })).toBeDisabled();
    await noSidewaysScroll(page);
    await expectNoSeriousA11yViolations(page, "custody form with refusals");
  });
});

test("the curator releases a refused refit with a reason, and the trail shows it", async ({ page, baseURL }) => {
  test.setTimeout(150_000);
  const m = await makeBreaker(baseURL!);
  await signIn(page, "curator");
  await page.goto(`/sites/${m.siteId}/log`);
  await page.getByLabel("Designation or tag number").fill(m.designation);
  await page
    .getByRole("list", { name: "Matching positions" })
    .getByRole("button", { name: new RegExp(m.designation) })
    .click();
  await page.getByRole("tab", { name: "Move the part" }).click();
  await page.getByLabel("Tag number on the bag").fill(`KL-${m.designation}`);
  await page.getByRole("button", { name: "Save move: Removed (tagged)" }).click();
  await expect(page.getByTestId("custody-now")).toHaveText("Removed (tagged)");
  await page.getByRole("button", { name: /^Refitted/ }).click();
  await page
    .getByLabel(/Release it anyway/)
    .fill("Dry fit for the survey photographs; locked out, not to be energised");
  await page.getByRole("button", { name: "Save move: Refitted (released)" }).click();
  await expect(page.getByTestId("custody-now")).toHaveText("Refitted");
  await expect(page.getByTestId("custody-proposal")).toContainText("The chain is complete here");
  await page.getByRole("link", { name: "See it on the board" }).click();
  await expect(page.getByTestId("custody-release")).toContainText("Dry fit for the survey photographs");
});
