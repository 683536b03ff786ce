import { expect, test, type Page } from "@playwright/test";
import sharp from "sharp";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";

/**
 * The crew's daily flows as each role does them: the photographer and the volunteer on a
 * 360 × 740 phone. Demo records are picked by name; what a test changes it makes itself.
 */
const jpeg = (color: string) =>
  sharp({ create: { width: 480, height: 360, channels: 3, background: color } })
    .jpeg({ quality: 80 })
    .toBuffer();

async function demoSiteId(page: Page) {
  const r = await page.request.get("/api/sites");
  return ((await r.json()) as { sites: Array<{ id: string; name: string }> }).sites.find(
    (s) => s.name === "MV Kestrel Lantern",
  )!.id;
}
export const noSidewaysScroll = async (page: Page, what: string) =>
  expect(
    await page.evaluate(() => document.documentElement.scrollWidth),
    `${what}: the page is no wider than the phone`,
  ).toBeLessThanOrEqual(await page.evaluate(() => window.innerWidth));

test.describe("on a 360 px phone", () => {
  test.use({ viewport: { width: 360, height: 740 } });
  test.setTimeout(120_000);

  test("the photographer's nameplate file is filed as a nameplate, can be changed before saving, and leaving with unsaved filings asks first", async ({
    page,
  }) => {
    await signIn(page, "photographer");
    const siteId = await demoSiteId(page);
    await page.goto(`/sites/${siteId}/photos`);
    await expect(page.getByRole("heading", { level: 1, name: "Photo desk" })).toBeVisible();
    const stamp = Date.now().toString(36);
    const plate = `5-1_nameplate_${stamp}_a-very-long-file-name-straight-off-the-camera-card.jpg`;
    const after = `5-2_after_${stamp}.jpg`;
    await page.getByTestId("photo-input").setInputFiles([
      { name: plate, mimeType: "image/jpeg", buffer: await jpeg("#5a6b7a") },
      { name: after, mimeType: "image/jpeg", buffer: await jpeg("#7a6b5a") },
    ]);
    await expect(page.locator('[data-testid="upload-row"][data-state="done"]')).toHaveCount(2, { timeout: 30_000 });

    await page.getByRole("button", { name: "Match file names" }).click();
    const plateRow = page.getByTestId("staged-row").filter({ hasText: plate });
    await expect(plateRow).toContainText("5-1");
    await expect(plateRow.getByLabel(`Kind of shot for ${plate}`)).toHaveValue("nameplate");
    await expect(plateRow.getByTestId("kind-from-name")).toHaveText("kind read from the file name");
    const afterRow = page.getByTestId("staged-row").filter({ hasText: after });
    await expect(afterRow.getByLabel(`Kind of shot for ${after}`)).toHaveValue("after_work");
    // The photographer knows better: the "after" shot is really a damage detail.
    await afterRow.getByLabel(`Kind of shot for ${after}`).selectOption("damage");
    await expect(afterRow.getByTestId("kind-from-name")).toHaveCount(0);
    // Long file names wrap; the keyboard hint is not shown on a phone.
    await noSidewaysScroll(page, "photo desk with staged filings");
    await expect(page.getByText("Page Up / Page Down step without filing")).toBeHidden();
    await page.screenshot({ path: "/tmp/daily-flows-photo-desk-360.png", fullPage: true });
    await expectNoSeriousA11yViolations(page, "photo desk with staged filings");

    // Leaving with unsaved filings asks; saying no keeps them.
    let asked = "";
    page.once("dialog", (d) => {
      asked = d.message();
      void d.dismiss();
    });
    await page.getByRole("link", { name: "Shoot list" }).first().click();
    await expect.poll(() => asked).toContain("not saved");
    await expect(page.getByRole("heading", { level: 1, name: "Photo desk" })).toBeVisible();
    await expect(page.getByTestId("staged-row").filter({ hasText: plate })).toBeVisible();

    // Only the two of this test are saved (other unfiled photos may have matched too).
    for (const row of await page.getByTestId("staged-row").all())
      if (!(await row.innerText()).includes(stamp)) await row.getByRole("button", { name: /^Unfile/ }).click();
    await page.getByRole("button", { name: /^Save 2 assignments$/ }).click();
    await expect(page.getByText("2 photos filed.")).toBeVisible();

    const photos = (await (await page.request.get(`/api/sites/${siteId}/photos`)).json()).photos as Array<{
      originalName: string;
      kind: string;
    }>;
    expect(photos.find((p) => p.originalName === plate)?.kind).toBe("nameplate");
    expect(photos.find((p) => p.originalName === after)?.kind).toBe("damage");
    // Nothing staged now: leaving asks nothing.
    await page.getByRole("link", { name: "Shoot list" }).first().click();
    await expect(page.getByRole("heading", { level: 1, name: "Shoot list" })).toBeVisible();
  });

  test("the volunteer finds a position in the quick log by a circuit name with a slip, and by a loosely typed tag", async ({
    page,
  }) => {
    await signIn(page, "volunteer");
    await page.getByRole("navigation", { name: "Site (phone)" }).getByRole("link", { name: "Quick log" }).click();
    const box = page.getByLabel("Designation or tag number");
    await box.fill("steerng gear");
    const list = page.getByRole("list", { name: "Matching positions" });
    await expect(list.getByRole("button").first()).toContainText("Steering gear");
    await box.fill("kl 421");
    await expect(list.getByRole("button").first()).toContainText("tag KL-0421");
    await box.fill("mccb");
    await expect(list.getByRole("button").first()).toContainText("Molded-case breaker");
    await noSidewaysScroll(page, "quick log search");
    await page.screenshot({ path: "/tmp/daily-flows-quick-log-360.png", fullPage: true });
  });
});
