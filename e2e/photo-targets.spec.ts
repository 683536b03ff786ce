import { expect, test, type Page } from "@playwright/test";
import sharp from "sharp";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";

/**
 * Where a photo is filed, as the photographer does it on a phone and at a desk: the board first, then one of its
 * positions (read only then), or typed and found across the site. The site's positions are never sent whole.
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

for (const { width, height } of [
  { width: 360, height: 740 },
  { width: 1280, height: 900 },
]) {
  test.describe(`at ${width} px`, () => {
    test.use({ viewport: { width, height } });
    test.setTimeout(120_000);

    test("the upload picks a board, then one of its positions, or finds one by typing, and files the photo there", async ({
      page,
    }) => {
      // Every answer about targets, to check none carries the site's positions.
      const targetAnswers: Array<{ url: string; body: string }> = [];
      page.on("response", async (r) => {
        if (r.url().includes("photo-targets") && r.request().method() === "GET")
          targetAnswers.push({ url: r.url(), body: await r.text().catch(() => "") });
      });
      await signIn(page, "photographer");
      const siteId = await demoSiteId(page);
      await page.goto(`/sites/${siteId}/photos`);
      await expect(page.getByRole("heading", { level: 1, name: "Photo desk" })).toBeVisible();
      const upload = page.getByRole("region", { name: "Upload a shoot" });
      const board = upload.getByRole("combobox", { name: /^Board/ });
      const position = upload.getByRole("combobox", { name: /^Position/ });
      await expect(position).toBeDisabled();
      // The boards are listed with their counts; no board's positions were read yet.
      await expect(board.locator("option", { hasText: /^Main switchboard.*positions\)$/ })).toHaveCount(1);
      expect(targetAnswers.some((a) => /\/boards\/[^/]+\/photo-targets/.test(a.url))).toBe(false);
      expect(targetAnswers.every((a) => !a.body.includes("designation"))).toBe(true);

      const mainId = await board.locator("option", { hasText: /^Main switchboard/ }).getAttribute("value");
      await board.selectOption(mainId!);
      await expect(position).toBeEnabled();
      await expect(position.locator("option", { hasText: /^4-7\b/ })).toHaveCount(1);
      const option47 = await position.locator("option", { hasText: /^4-7\b/ }).getAttribute("value");
      await position.selectOption(option47!);
      await page.screenshot({ path: `/tmp/photo-targets-upload-${width}.png`, fullPage: true });

      // Typed instead: the site-wide search sets the board and the position.
      await upload.getByLabel("Or find a position").fill("5-2");
      const found = upload.getByRole("list", { name: "Positions found" });
      await found.getByRole("button", { name: /^5-2 Main switchboard/ }).click();
      await expect(board).toHaveValue(mainId!);
      await expect(position.locator("option:checked")).toHaveText(/^5-2\b/);
      if (width === 360) {
        expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(width);
      }
      await page.screenshot({ path: `/tmp/photo-targets-found-${width}.png`, fullPage: true });
      await expectNoSeriousA11yViolations(page, "photo desk with a position chosen");

      // The photo goes up filed to 5-2 on the main board.
      const name = `picked-${width}-${Date.now().toString(36)}.jpg`;
      await page
        .getByTestId("photo-input")
        .setInputFiles([{ name, mimeType: "image/jpeg", buffer: await jpeg("#456") }]);
      await expect(page.locator('[data-testid="upload-row"][data-state="done"]')).toHaveCount(1, { timeout: 30_000 });
      const photos = (await (await page.request.get(`/api/sites/${siteId}/photos?boardId=${mainId}`)).json())
        .photos as Array<{ originalName: string; designation: string | null }>;
      expect(photos.find((p) => p.originalName === name)?.designation).toBe("5-2");
    });
  });
}

test("the gallery's tag form moves a photo to another board's position, found by choosing the board", async ({
  page,
}) => {
  await page.setViewportSize({ width: 360, height: 740 });
  await signIn(page, "photographer");
  const siteId = await demoSiteId(page);
  const { boards } = (await (await page.request.get(`/api/sites/${siteId}/photo-targets`)).json()) as {
    boards: Array<{ id: string; name: string }>;
  };
  const main = boards.find((b) => b.name.startsWith("Main"))!;
  const emergency = boards.find((b) => b.name.startsWith("Emergency"))!;
  const { targets } = (await (
    await page.request.get(`/api/sites/${siteId}/boards/${main.id}/photo-targets`)
  ).json()) as { targets: Array<{ positionId: string; designation: string }> };
  const from = targets.find((t) => t.designation === "3-3")!;
  const name = `to-move-${Date.now().toString(36)}.jpg`;
  const r = await page.request.post(`/api/sites/${siteId}/photos`, {
    headers: { origin: new URL(page.url()).origin },
    multipart: {
      kind: "as_found",
      caption: name,
      positionId: from.positionId,
      files: { name, mimeType: "image/jpeg", buffer: await jpeg("#654") },
    },
  });
  expect(r.status()).toBe(201);
  await page.goto(`/sites/${siteId}/photos/gallery?positionId=${from.positionId}`);
  await expect(page.getByRole("heading", { level: 1, name: "Photos of position 3-3" })).toBeVisible();
  await page.getByRole("button", { name: new RegExp(`^Open photo: .*${name}`) }).click();
  const viewer = page.getByRole("dialog");
  const form = viewer.getByRole("form", { name: "Tag this photo" });
  await form.getByRole("combobox", { name: /^Board/ }).selectOption(emergency.id);
  const position = form.getByRole("combobox", { name: /^Position/ });
  await expect(position.locator("option")).not.toHaveCount(1);
  const second = position.locator("option").nth(1);
  const label = ((await second.textContent()) ?? "").trim();
  await position.selectOption({ index: 1 });
  await page.screenshot({ path: "/tmp/photo-targets-tag-form-360.png", fullPage: true });
  await form.getByRole("button", { name: "Save tags" }).click();
  // Saved, the photo leaves this position's gallery (the viewer steps to the next of the position's photos).
  await expect(page.getByRole("button", { name: new RegExp(`^Open photo: .*${name}`) })).toHaveCount(0);
  const moved = (await (await page.request.get(`/api/sites/${siteId}/photos?boardId=${emergency.id}`)).json())
    .photos as Array<{ originalName: string; designation: string | null }>;
  expect(moved.find((p) => p.originalName === name)?.designation).toBe(label.split(" · ")[0]);
  await page.screenshot({ path: "/tmp/photo-targets-tag-form-saved-360.png", fullPage: true });
});
