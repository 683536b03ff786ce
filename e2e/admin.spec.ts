import { expect, test } from "@playwright/test";
import { signIn } from "./support/auth";
import { uniqueEmail } from "./support/mailbox";

test.use({ viewport: { width: 360, height: 740 } });

test("the instance admin makes a site and an account; a refused field says why beside it", async ({ page }) => {
  await signIn(page, "admin");
  await page.goto("/admin");
  await expect(page.getByRole("heading", { name: "Instance administration" })).toBeVisible();

  const siteForm = page.locator("form", { has: page.getByRole("heading", { name: "New site" }) });
  const name = `Pilot cutter Saltmarsh ${Date.now()}`;
  await siteForm.getByLabel("Name").fill(name);
  await siteForm.getByLabel("Kind").selectOption("vessel");
  await siteForm.getByRole("button", { name: "Create site" }).click();
  await expect(page.getByRole("status")).toHaveText(`Site “${name}” created.`);
  await expect(siteForm.getByLabel("Name")).toHaveValue("");

  // The password rule is the server's own (createUserBody): the form says it beside the field before sending.
  const accountForm = page.locator("form", { has: page.getByRole("heading", { name: "New account" }) });
  const email = uniqueEmail("deckhand");
  await accountForm.getByLabel("E-mail").fill(email);
  await accountForm.getByLabel("Name").fill("Oriel Penhallow");
  await accountForm.getByLabel("Password").fill("short");
  await accountForm.getByRole("button", { name: "Create account" }).click();
  await expect(accountForm.getByText("Use at least 10 characters")).toBeVisible();
  await page.screenshot({ path: ".data/test-results/admin-refused-phone.png", fullPage: true });
  await accountForm.getByLabel("Password").fill("long-enough-passphrase");
  await accountForm.getByRole("button", { name: "Create account" }).click();
  await expect(page.getByRole("status")).toHaveText(`Account ${email} created.`);
  await expect(accountForm.getByText("Use at least 10 characters")).toHaveCount(0);
});
