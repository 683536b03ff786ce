import { expect, test } from "@playwright/test";
import sharp from "sharp";
import { signIn } from "./support/auth";

/**
 * The thermal form lets the person pick the thermal image among the position's
 * photos filed as thermal, by thumbnail (no internal photo id to type), and the scan's history shows
 * that image. The volunteer records it on a 360 × 740 phone.
 */
test.use({ viewport: { width: 360, height: 740 } });
test.setTimeout(150_000);

test("a volunteer picks the thermal image of a scan by its thumbnail, and the scan shows it", async ({ page }) => {
  // The photographer files a thermal image of G2 (main board) first.
  await signIn(page, "photographer");
  const origin = new URL(page.url()).origin;
  const siteId = page.url().match(/\/sites\/([0-9a-f-]{36})/)![1];
  const { boards } = (await (await page.request.get(`/api/sites/${siteId}/readings/targets`)).json()) as {
    boards: Array<{ id: string; name: string; positionCount: number }>;
  };
  const main = boards.find((b) => b.name.startsWith("Main switchboard"))!;
  const { positions } = (await (await page.request.get(`/api/sites/${siteId}/boards/${main.id}/readings`)).json()) as {
    positions: Array<{ positionId: string; designation: string; componentId: string | null }>;
  };
  const g2 = positions.find((p) => p.designation === "G2")!;
  const caption = `G2 after warm-up ${Date.now().toString(36)}`;
  const image = await sharp({ create: { width: 320, height: 240, channels: 3, background: "#c0402a" } })
    .jpeg()
    .toBuffer();
  const up = await page.request.post(`/api/sites/${siteId}/photos`, {
    headers: { origin },
    multipart: {
      kind: "thermal",
      caption,
      positionId: g2.positionId,
      files: { name: "ir-g2.jpg", mimeType: "image/jpeg", buffer: image },
    },
  });
  expect(up.status()).toBe(201);
  await page.getByRole("button", { name: "Sign out" }).click();

  await signIn(page, "volunteer");
  await page.goto(`/sites/${siteId}/readings/components/${g2.componentId}`);
  await expect(page.getByRole("heading", { level: 1, name: /G2/ })).toBeVisible();
  await page.getByRole("button", { name: "Thermal scan" }).click();
  const form = page.getByRole("form", { name: "Record a thermal scan" });
  await expect(form.getByText("photo id")).toHaveCount(0);
  const pick = form.getByRole("group", { name: "Thermal image (optional)" });
  await expect(pick.getByRole("radio", { name: "None" })).toBeChecked();
  const choice = pick.getByRole("radio", { name: new RegExp(caption) });
  await expect(choice).toBeVisible();
  await expect(pick.locator("img")).not.toHaveCount(0);
  await choice.check();
  await page.screenshot({ path: ".data/test-results/thermal-picker-phone.png", fullPage: false });

  await form.getByLabel("Component temperature (°C)").fill("41");
  await form.getByLabel("Similar component, similar load (°C)").fill("37");
  await form.getByLabel("Ambient air (°C)").fill("22");
  await form.getByRole("button", { name: "Save scan" }).click();
  await expect(page.getByRole("status").filter({ hasText: /Saved\. Level/ })).toBeVisible();

  const findings = page.getByRole("list", { name: "Thermal findings" });
  await expect(findings.getByRole("img", { name: "Thermal image of G2" }).first()).toBeVisible();
  await expect(findings.getByText(/photo [0-9a-f]{8}/)).toHaveCount(0);
  const scrollWidth = await page.evaluate(() => document.documentElement.scrollWidth);
  expect(scrollWidth).toBeLessThanOrEqual(360);
});
