import { expect, test } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { adminApi, linkIn, uniqueEmail, waitForMail } from "./support/mailbox";

test("someone who forgot their password gets a link by e-mail, sets a new one and is signed in", async ({
  page,
  baseURL,
}) => {
  const email = uniqueEmail("forgetful");
  const api = await adminApi(baseURL!);
  // A throw-away account, so the demo accounts keep their password.
  expect(
    (
      await api.post("/api/admin/users", { data: { email, name: "Sable Oakum", password: "first-password-1" } })
    ).status(),
  ).toBe(201);

  await page.goto("/sign-in");
  await page.getByRole("link", { name: "Forgot your password?" }).click();
  await expect(page.getByRole("heading", { name: "Forgot your password?" })).toBeVisible();
  await expectNoSeriousA11yViolations(page, "reset request page");
  await page.getByLabel("E-mail").fill(email);
  await page.getByRole("button", { name: "Send me a link" }).click();
  const said = await page.getByRole("status").textContent();
  expect(said).toContain("If an account uses that address");

  // An unknown address gets word for word the same answer.
  await page.goto("/reset-password");
  await page.getByLabel("E-mail").fill(uniqueEmail("nobody"));
  await page.getByRole("button", { name: "Send me a link" }).click();
  await expect(page.getByRole("status")).toHaveText(said!);

  const link = linkIn(await waitForMail(api, email, /new Tideline password/), "/reset-password/");
  await page.goto(link);
  await expect(page.getByRole("heading", { name: "Set a new password" })).toBeVisible();
  await expectNoSeriousA11yViolations(page, "new password page");
  await page.getByLabel("New password").fill("second-password-2");
  await page.getByRole("button", { name: "Set the new password" }).click();
  await expect(page.getByRole("heading", { name: "Your sites" })).toBeVisible();

  await page.getByRole("button", { name: "Sign out" }).click();
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("second-password-2");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByTestId("user-name")).toHaveText("Sable Oakum");

  await page.goto(link);
  await expect(page.getByRole("alert")).toContainText("already been used");
  await api.dispose();
});
