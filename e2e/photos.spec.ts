import { expect, test, type Page } from "@playwright/test";
import sharp from "sharp";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";

/** A small real JPEG drawn here (a flat colour with a label), not a photograph. */
const jpeg = (color: string) =>
  sharp({ create: { width: 640, height: 480, channels: 3, background: color } })
    .jpeg({ quality: 80 })
    .toBuffer();

async function siteId(page: Page) {
  const r = await page.request.get("/api/sites");
  return ((await r.json()) as { sites: Array<{ id: string; name: string }> }).sites.find(
    (s) => s.name === "MV Kestrel Lantern",
  )!.id;
}

/** The main board's positions, as the photo pages read them: the boards first, then one board's positions. */
async function mainBoardTargets(page: Page, id: string) {
  const { boards } = (await (await page.request.get(`/api/sites/${id}/photo-targets`)).json()) as {
    boards: Array<{ id: string; name: string; positionCount: number }>;
  };
  const main = boards.find((b) => b.name.startsWith("Main"))!;
  const r = await page.request.get(`/api/sites/${id}/boards/${main.id}/photo-targets`);
  return ((await r.json()) as { targets: Array<{ positionId: string; boardId: string; designation: string }> }).targets;
}

test("the photographer drops three photos, watches them finish, files them to positions, and the board tiles show the camera badge", async ({
  page,
}) => {
  await signIn(page, "photographer");
  await page.getByRole("link", { name: "Photo desk" }).first().click();
  await expect(page.getByRole("heading", { level: 1, name: "Photo desk" })).toBeVisible();
  await expectNoSeriousA11yViolations(page, "photo desk");

  const stamp = Date.now().toString(36);
  await page.getByTestId("photo-input").setInputFiles([
    { name: `4-7 front ${stamp}.jpg`, mimeType: "image/jpeg", buffer: await jpeg("#5a6b7a") },
    { name: `4-8_nameplate_${stamp}.jpg`, mimeType: "image/jpeg", buffer: await jpeg("#7a6b5a") },
    { name: `DSC_${stamp}.jpg`, mimeType: "image/jpeg", buffer: await jpeg("#6b7a5a") },
  ]);
  const rows = page.getByTestId("upload-row");
  await expect(rows).toHaveCount(3);
  await expect(page.locator('[data-testid="upload-row"][data-state="done"]')).toHaveCount(3, { timeout: 20_000 });
  for (const bar of await page.getByRole("progressbar").all()) await expect(bar).toHaveAttribute("value", "100");
  await expect(page.getByText("3 of 3 uploaded.")).toBeVisible();

  // Two file names carry a designation: matched and shown before saving.
  await page.getByRole("button", { name: "Match file names" }).click();
  const staged = page.getByTestId("staged-row");
  await expect(staged.filter({ hasText: `4-7 front ${stamp}.jpg` })).toContainText("4-7");
  await expect(staged.filter({ hasText: `4-8_nameplate_${stamp}.jpg` })).toContainText("4-8");

  // The third by keyboard: step to it, type the designation, Enter.
  const input = page.getByLabel("Designation or tag number");
  await input.focus();
  for (let i = 0; i < 3; i++) {
    if (
      (await page.getByText(`DSC_${stamp}.jpg`, { exact: false }).first().isVisible()) &&
      (await page.locator("figcaption").innerText()).includes(`DSC_${stamp}`)
    )
      break;
    await page.keyboard.press("PageDown");
  }
  await expect(page.locator("figcaption")).toContainText(`DSC_${stamp}.jpg`);
  await input.fill("4-9");
  await page.keyboard.press("Enter");
  await expect(staged.filter({ hasText: `DSC_${stamp}.jpg` })).toContainText("4-9");
  await page.screenshot({ path: "/tmp/photos-desk-desktop.png", fullPage: true });

  await page.getByRole("button", { name: /^Save 3 assignments$/ }).click();
  await expect(page.getByText("3 photos filed.")).toBeVisible();

  // Each position now counts its photo (the board tiles' camera badge reads the same rows).
  const id = await siteId(page);
  const targets = await mainBoardTargets(page, id);
  for (const d of ["4-7", "4-8", "4-9"]) {
    const t = targets.find((x) => x.designation === d)!;
    const list = (await (await page.request.get(`/api/sites/${id}/photos?positionId=${t.positionId}`)).json())
      .photos as Array<{ originalName: string }>;
    expect(
      list.some((p) => p.originalName.includes(stamp)),
      `photo filed to ${d}`,
    ).toBe(true);
  }
  // The board elevation: the three tiles now carry the camera badge (and say so in words).
  await page.goto(`/sites/${id}/boards/${targets[0].boardId}`);
  for (const d of ["4-7", "4-8", "4-9"]) {
    const tile = page.getByTestId(`tile-${d}`);
    await expect(tile).toHaveAccessibleName(/\d+ photos?/);
    await expect(tile.locator('[title="photos"]')).toBeVisible();
  }
  await expect(page.getByTestId("tile-4-10")).not.toHaveAccessibleName(/photo/);
});

test("the shoot list shows what is missing, and the gallery's viewer steps with the keyboard", async ({ page }) => {
  await signIn(page, "photographer");
  const id = await siteId(page);
  await page.goto(`/sites/${id}/photos/shoot-list`);
  await expect(page.getByRole("heading", { level: 1, name: "Shoot list" })).toBeVisible();
  await expect(page.getByRole("progressbar", { name: "Shoot list progress" })).toBeVisible();
  await expect(page.getByTestId("shoot-row").first()).toContainText("Missing:");
  await expectNoSeriousA11yViolations(page, "shoot list");

  // Two photos of one position, uploaded through the API, then the position's gallery.
  const pos = (await mainBoardTargets(page, id)).find((x) => x.designation === "5-3")!;
  for (const [kind, color] of [
    ["as_found", "#444"],
    ["after_work", "#999"],
  ]) {
    const r = await page.request.post(`/api/sites/${id}/photos`, {
      headers: { origin: new URL(page.url()).origin },
      multipart: {
        kind,
        positionId: pos.positionId,
        files: { name: `${kind}.jpg`, mimeType: "image/jpeg", buffer: await jpeg(color) },
      },
    });
    expect(r.status()).toBe(201);
  }
  await page.goto(`/sites/${id}/photos/gallery?positionId=${pos.positionId}`);
  await expect(page.getByRole("heading", { level: 1, name: "Photos of position 5-3" })).toBeVisible();
  await expect(page.getByRole("heading", { name: "Before and after" })).toBeVisible();
  await page.getByLabel("Slider").check();
  await expect(page.getByRole("slider")).toBeVisible();
  await expectNoSeriousA11yViolations(page, "position gallery");
  await page
    .getByRole("button", { name: /^Open photo/ })
    .first()
    .click();
  const viewer = page.getByRole("dialog");
  await expect(viewer).toHaveAccessibleName(/^Photo 1 of 2/);
  // A modal dialog (HTML's showModal): in the top layer, the page beneath inert and not scrolling behind it.
  expect(
    await page.evaluate(() => ({
      modal: document.querySelector("dialog")?.matches(":modal"),
      overflow: getComputedStyle(document.documentElement).overflow,
    })),
  ).toEqual({ modal: true, overflow: "hidden" });
  await expect(viewer.getByRole("button", { name: "Close" })).toBeFocused();
  await page.keyboard.press("ArrowRight");
  await expect(viewer).toHaveAccessibleName(/^Photo 2 of 2/);
  await page.keyboard.press("ArrowLeft");
  await expect(viewer).toHaveAccessibleName(/^Photo 1 of 2/);
  // Tag it from the viewer: caption and kind, saved with its version.
  await viewer.getByLabel("Caption").fill("Line side, after cleaning");
  await viewer.getByRole("button", { name: "Save tags" }).click();
  await expect(viewer.getByText("✓ Saved.")).toBeVisible();
  await page.screenshot({ path: "/tmp/photos-viewer-desktop.png" });
  await page.keyboard.press("Escape");
  await expect(viewer).toBeHidden();
  // Closed, focus is back on the photo it was opened from, and the page scrolls again.
  await expect(page.getByRole("button", { name: /^Open photo/ }).first()).toBeFocused();
  expect(await page.evaluate(() => getComputedStyle(document.documentElement).overflow)).toBe("visible");
});

test("a file the server refuses as a picture fails with its reason and no Retry (sending it again cannot help)", async ({
  page,
}) => {
  await signIn(page, "photographer");
  await page.getByRole("link", { name: "Photo desk" }).first().click();
  await expect(page.getByRole("heading", { level: 1, name: "Photo desk" })).toBeVisible();
  await page.getByTestId("photo-input").setInputFiles([
    {
      name: `broken-${Date.now().toString(36)}.jpg`,
      mimeType: "image/jpeg",
      buffer: Buffer.from("not a picture at all"),
    },
  ]);
  const failed = page.locator('[data-testid="upload-row"][data-state="failed"]');
  await expect(failed).toHaveCount(1, { timeout: 20_000 });
  await expect(failed).toContainText("Failed");
  await expect(failed.getByRole("button", { name: /^Retry/ })).toHaveCount(0);
  await expect(failed.getByRole("progressbar")).toHaveAttribute("value", "0");
});

test.describe("on a phone", () => {
  test.use({ viewport: { width: 360, height: 740 } });
  test("chosen photos bring their progress into view (it starts below the form and the drop area)", async ({
    page,
  }) => {
    await signIn(page, "photographer");
    await page.getByRole("link", { name: "Photo desk" }).first().click();
    await expect(page.getByRole("heading", { level: 1, name: "Photo desk" })).toBeVisible();
    // From the top of the page (the kind, caption and place fields fill the phone's screen).
    await page.evaluate(() => window.scrollTo(0, 0));
    await expect(page.getByTestId("upload-summary")).toHaveCount(0);
    await page
      .getByTestId("photo-input")
      .setInputFiles([
        { name: `phone-${Date.now().toString(36)}.jpg`, mimeType: "image/jpeg", buffer: await jpeg("#4a5b6c") },
      ]);
    await expect(page.getByTestId("upload-summary")).toBeInViewport();
    await expect(page.locator('[data-testid="upload-row"][data-state="done"]')).toHaveCount(1, { timeout: 20_000 });
  });
});
