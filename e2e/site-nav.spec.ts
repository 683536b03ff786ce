import { expect, test } from "@playwright/test";
import { signIn } from "./support/auth";

/**
 * On a laptop or a tablet the site's page links wrap onto a second row rather than run off the
 * edge: a curator sees every page they may open without scrolling a strip sideways.
 */
for (const viewport of [
  { width: 1280, height: 800 },
  { width: 800, height: 700 },
]) {
  test(`every site page link is in view at ${viewport.width} px`, async ({ page }) => {
    await page.setViewportSize(viewport);
    await signIn(page, "curator");
    const nav = page.getByRole("navigation", { name: "Site", exact: true });
    await expect(nav.getByRole("link", { name: "Crew" })).toBeVisible();
    const links = nav.getByRole("link");
    expect(await links.count()).toBeGreaterThan(10);
    const fit = await nav.evaluate((el) => ({ scroll: el.scrollWidth, client: el.clientWidth }));
    expect(fit.scroll).toBeLessThanOrEqual(fit.client);
    for (const link of await links.all()) {
      const box = (await link.boundingBox())!;
      expect(box.x, await link.innerText()).toBeGreaterThanOrEqual(0);
      expect(box.x + box.width, await link.innerText()).toBeLessThanOrEqual(viewport.width);
    }
  });
}

test("the site's navigation marks where a board, its readings and its return to service belong", async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 800 });
  await signIn(page, "curator");
  const siteId = page.url().split("/sites/")[1].split("/")[0];
  const nav = page.getByRole("navigation", { name: "Site", exact: true });
  await nav.getByRole("link", { name: "Boards" }).click();
  await expect(nav.getByRole("link", { name: "Boards" })).toHaveAttribute("aria-current", "page");
  const boards = (await (await page.request.get(`/api/sites/${siteId}/boards`)).json()) as Array<{ id: string }>;
  await page.goto(`/sites/${siteId}/boards/${boards[0].id}`);
  await expect(nav.getByRole("link", { name: "Boards" })).toHaveAttribute("aria-current", "true");
  await page.goto(`/sites/${siteId}/readings/boards/${boards[0].id}`);
  await expect(nav.getByRole("link", { name: "Readings" })).toHaveAttribute("aria-current", "true");
  await expect(nav.getByRole("link", { name: "Boards" })).not.toHaveAttribute("aria-current");
  await page.goto(`/sites/${siteId}/boards/${boards[0].id}/return-to-service`);
  await expect(nav.getByRole("link", { name: "Return to service" })).toHaveAttribute("aria-current", "true");
  await expect(page.locator('nav[aria-label="Site"] [aria-current]')).toHaveCount(1);
});
