import { expect, test } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";

test("a member switches an e-mail notification off on the account page, and it stays off", async ({ page }) => {
  await signIn(page, "photographer");
  await page.getByRole("link", { name: "Account" }).click();
  await expect(page.getByRole("heading", { name: "Your account" })).toBeVisible();
  await expectNoSeriousA11yViolations(page, "account page");
  const weekly = page.getByRole("switch", { name: /Weekly summary/ });
  await expect(weekly).toBeChecked();
  await weekly.click();
  await expect(weekly).not.toBeChecked();
  await page.reload();
  await expect(page.getByRole("switch", { name: /Weekly summary/ })).not.toBeChecked();
  await page.getByRole("switch", { name: /Weekly summary/ }).click(); // leave the demo as it was
  await expect(page.getByRole("switch", { name: /Weekly summary/ })).toBeChecked();
});
