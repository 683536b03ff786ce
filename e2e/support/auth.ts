import { expect, type Page } from "@playwright/test";

export const DEMO_PASSWORD = "tideline-demo";
export const DEMO_SITE = "MV Kestrel Lantern";

/** Signs in through the real form, as a person would. */
export async function signIn(
  page: Page,
  role: "admin" | "curator" | "volunteer" | "photographer" | "scrounger" | "viewer",
) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(`${role}@tideline.test`);
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("button", { name: "Sign out" })).toBeVisible();
  // The start page redirects on: wait for the landing page, so page.url() is the site's.
  await page.waitForURL(role === "admin" ? /\/sites$/ : /\/sites\/[0-9a-f-]{36}/);
}
