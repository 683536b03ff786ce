import { expect, test } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { DEMO_SITE, signIn } from "./support/auth";

const HOMES = {
  curator: "Restoration lead's desk",
  volunteer: "Teardown log",
  photographer: "Photo desk",
  scrounger: "Parts hunt",
  viewer: "Progress",
} as const;

for (const [role, title] of Object.entries(HOMES)) {
  test(`the demo ${role} signs in, lands on their home page, and signs out`, async ({ page }) => {
    await signIn(page, role as keyof typeof HOMES);
    await expect(page.getByTestId("site-name")).toHaveText(DEMO_SITE);
    await expect(page.getByRole("heading", { level: 1, name: title })).toBeVisible();
    await page.getByRole("button", { name: "Sign out" }).click();
    await expect(page.getByRole("heading", { name: "Sign in" })).toBeVisible();
    await page.goto("/");
    await expect(page).toHaveURL(/\/sign-in/);
  });
}

test("the demo admin signs in and lands on the site list with the admin page one click away", async ({ page }) => {
  await signIn(page, "admin");
  await expect(page.getByRole("heading", { name: "Your sites" })).toBeVisible();
  await expect(page.getByRole("link", { name: new RegExp(DEMO_SITE) })).toBeVisible();
  await page.getByRole("link", { name: "Admin", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Instance administration" })).toBeVisible();
});

test("a wrong password shows one message and no session", async ({ page }) => {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill("curator@tideline.test");
  await page.getByLabel("Password").fill("not-the-password");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("alert")).toHaveText("That e-mail and password do not match an account.");
});

test("the sign-in page and the home page pass the accessibility scan", async ({ page }) => {
  await page.goto("/sign-in");
  await expectNoSeriousA11yViolations(page, "sign-in page");
  await signIn(page, "curator");
  await expect(page.getByRole("heading", { level: 1 })).toBeVisible();
  await expectNoSeriousA11yViolations(page, "curator home page");
});

test("the sign-in form works from the keyboard alone", async ({ page }) => {
  await page.goto("/sign-in");
  await expect(page.getByLabel("E-mail")).toBeVisible();
  await page.keyboard.press("Tab");
  await page.keyboard.type("viewer@tideline.test");
  await page.keyboard.press("Tab");
  await page.keyboard.type("tideline-demo");
  await page.keyboard.press("Enter");
  await expect(page.getByRole("heading", { level: 1, name: "Progress" })).toBeVisible();
});
