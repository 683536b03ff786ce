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
