import { expect, test } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";
import { uniqueEmail } from "./support/mailbox";

test.use({ viewport: { width: 360, height: 740 } });

test("the instance admin makes a site and an account, a refused field says why beside it, and the account is listed", async ({
  page,
}) => {
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
  // The list of accounts takes the new one in, with no site yet; the demo's curator with her site and role.
  const accounts = page.getByRole("region", { name: /Accounts on this instance/ });
  await expect(accounts.getByTestId("account").filter({ hasText: email })).toContainText("No site yet");
  await expect(accounts.getByTestId("account").filter({ hasText: "curator@tideline.test" })).toContainText(
    "MV Kestrel Lantern: curator",
  );
  await expect(accounts.getByTestId("account").filter({ hasText: "admin@tideline.test" })).toContainText(
    "Acts as curator on every site",
  );
  await expectNoSeriousA11yViolations(page, "instance administration");
});
