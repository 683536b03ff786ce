import { expect, test, type Page } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";
import { adminApi, uniqueEmail, waitForMail } from "./support/mailbox";

/** An account of its own (made by the demo admin), so the demo's shared accounts never change under other tests. */
async function personOfTheirOwn(baseURL: string, tag: string, name: string, password: string) {
  const admin = await adminApi(baseURL);
  const email = uniqueEmail(tag);
  const made = await admin.post("/api/admin/users", { data: { email, name, password, isAdmin: false } });
  expect(made.status()).toBe(201);
  await admin.dispose();
  return email;
}

async function signInWith(p: Page, email: string, password: string) {
  await p.goto("/sign-in");
  await p.getByLabel("E-mail").fill(email);
  await p.getByLabel("Password").fill(password);
  await p.getByRole("button", { name: "Sign in" }).click();
  await expect(p.getByRole("button", { name: "Sign out", exact: true })).toBeVisible();
}

test("a curator switches an e-mail notification off on the account page, and it stays off", async ({ page }) => {
  await signIn(page, "curator");
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

test("each role is offered only the e-mails it receives", async ({ page }) => {
  await signIn(page, "photographer");
  await page.goto("/account");
  await expect(page.getByRole("switch", { name: /A defect is assigned to me/ })).toBeVisible();
  await expect(page.getByRole("switch")).toHaveCount(1);
  await page.getByRole("button", { name: "Sign out", exact: true }).click();
  await signIn(page, "viewer");
  await page.goto("/account");
  await expect(page.getByText("None of your roles receives e-mail from Tideline")).toBeVisible();
  await expect(page.getByRole("switch")).toHaveCount(0);
});

test.describe("on a phone", () => {
  test.use({ viewport: { width: 360, height: 740 } });

  test("a person changes their password while signed in: the current one first, other sessions end, an e-mail tells them", async ({
    page,
    browser,
    baseURL,
  }) => {
    const email = await personOfTheirOwn(baseURL!, "pw-change", "Wren Halloway", "first harbour phrase");
    const other = await browser.newPage();
    for (const p of [page, other]) await signInWith(p, email, "first harbour phrase");

    await page.goto("/account");
    const form = page.getByRole("region", { name: "Change your password" });
    await form.getByLabel("Current password").fill("not my password");
    await form.getByLabel("New password").fill("second harbour phrase");
    await form.getByRole("button", { name: "Change password" }).click();
    await expect(form.getByText("That is not your current password")).toBeVisible();

    await form.getByLabel("Current password").fill("first harbour phrase");
    await form.getByRole("button", { name: "Change password" }).click();
    await expect(form.getByRole("status")).toContainText("Password changed");
    await expect(form.getByLabel("Current password")).toHaveValue("");
    await page.screenshot({ path: ".data/test-results/account-password-phone.png", fullPage: true });

    // This phone stays signed in; the other browser is signed out at its next request.
    await page.reload();
    await expect(page.getByRole("heading", { name: "Your account" })).toBeVisible();
    expect((await other.request.get("/api/session")).status()).toBe(401);
    await other.close();

    const admin = await adminApi(baseURL!);
    const notice = await waitForMail(admin, email, /password was changed/);
    expect(notice.text).toContain("Hello Wren Halloway");
    expect(notice.text).toContain("/reset-password");
    await admin.dispose();
  });
});

test.describe("on a phone, signing out elsewhere", () => {
  test.use({ viewport: { width: 360, height: 740 } });

  test("a person sees where they are signed in and signs out everywhere else", async ({ page, browser, baseURL }) => {
    const email = await personOfTheirOwn(baseURL!, "elsewhere", "Demelza Rowe", "second harbour phrase");
    const laptop = await browser.newPage();
    for (const p of [page, laptop]) await signInWith(p, email, "second harbour phrase");
    await page.goto("/account");
    const places = page.getByRole("region", { name: "Where you are signed in" });
    await expect(places.getByText("2 places are signed in to this account, this one included.")).toBeVisible();
    await places.getByRole("button", { name: "Sign out everywhere else" }).click();
    await expect(places.getByRole("status")).toHaveText("Signed out of 1 place. Anyone there must sign in again.");
    await expect(places.getByText("Only this place is signed in to this account.")).toBeVisible();
    await expect(places.getByRole("button", { name: "Sign out everywhere else" })).toBeDisabled();
    await page.screenshot({ path: ".data/test-results/account-places-phone.png", fullPage: true });
    await laptop.reload();
    await expect(laptop.getByRole("button", { name: "Sign in" })).toBeVisible();
    await laptop.close();
  });
});
