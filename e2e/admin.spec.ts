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
  // The account list comes first; each form opens when asked for.
  await expect(page.getByRole("heading", { name: "New site" })).toHaveCount(0);
  await page.getByRole("button", { name: "New site…" }).click();

  const siteForm = page.locator("form", { has: page.getByRole("heading", { name: "New site" }) });
  const name = `Pilot cutter Saltmarsh ${Date.now()}`;
  await siteForm.getByLabel("Name").fill(name);
  await siteForm.getByLabel("Kind").selectOption("vessel");
  await siteForm.getByRole("button", { name: "Create site" }).click();
  await expect(page.getByRole("status")).toHaveText(`Site “${name}” created.`);
  await expect(siteForm.getByLabel("Name")).toHaveValue("");

  // The password rule is the server's own (createUserBody): the form says it beside the field before sending.
  await page.getByRole("button", { name: "New account…" }).click();
  await expect(siteForm).toHaveCount(0);
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

test("the instance admin suspends an account: it is signed out at once, told why it cannot sign in, and reinstated", async ({
  page,
  browser,
}) => {
  await signIn(page, "admin");
  const email = uniqueEmail("leaver");
  const made = await page.request.post("/api/admin/users", {
    data: { email, name: "Jory Trevaskis", password: "long-enough-passphrase" },
    headers: { origin: new URL(page.url()).origin },
  });
  expect(made.status()).toBe(201);

  // The account is signed in on its own phone.
  const phoneCtx = await browser.newContext({ viewport: { width: 360, height: 740 } });
  const phone = await phoneCtx.newPage();
  const signInAs = async () => {
    await phone.goto("/sign-in");
    await phone.getByLabel("E-mail").fill(email);
    await phone.getByLabel("Password").fill("long-enough-passphrase");
    await phone.getByRole("button", { name: "Sign in" }).click();
  };
  await signInAs();
  await expect(phone.getByRole("button", { name: "Sign out" })).toBeVisible();

  await page.goto("/admin");
  // Found by name among every account of the instance.
  await page.getByLabel("Find an account").fill("jory trev");
  await expect(page.getByText(/^1 of \d+ accounts shown\.$/)).toBeVisible();
  await expect(page.getByTestId("account")).toHaveCount(1);
  const row = page.getByTestId("account").filter({ hasText: email });
  await row.getByRole("button", { name: "Suspend Jory Trevaskis…" }).click();
  const form = row.getByRole("form", { name: "Suspend Jory Trevaskis" });
  await form.getByRole("button", { name: "Suspend and sign out everywhere" }).click();
  await expect(form.getByText("Say why, for the record (at least 3 characters)")).toBeVisible();
  await form.getByLabel(/^Why/).fill("Left the crew; phone not returned");
  await form.getByRole("button", { name: "Suspend and sign out everywhere" }).click();
  await expect(
    row.getByText(/^Suspended \d{4}-\d{2}-\d{2} \d{2}:\d{2} by .+: Left the crew; phone not returned$/),
  ).toBeVisible();
  await expect(row.getByRole("button", { name: "Reinstate Jory Trevaskis" })).toBeVisible();
  // Not made an instance admin while suspended: reinstated first.
  await expect(row.getByRole("button", { name: "Make instance admin" })).toHaveCount(0);
  await page.getByLabel("Find an account").fill("");
  await page.getByLabel(/^Suspended only/).check();
  await expect(page.getByTestId("account").filter({ hasText: email })).toHaveCount(1);
  await expect(page.getByTestId("account").filter({ hasText: "admin@tideline.test" })).toHaveCount(0);
  await page.screenshot({ path: ".data/test-results/admin-suspended-phone.png", fullPage: true });
  await expectNoSeriousA11yViolations(page, "instance administration with a suspended account");

  // The phone's session ended with the suspension: its next page is the sign-in, and signing in says why not.
  await phone.reload();
  await expect(phone.getByRole("button", { name: "Sign in" })).toBeVisible();
  await signInAs();
  await expect(phone.getByRole("alert")).toContainText(
    "This account is suspended. Ask your instance's admin if you should have it back.",
  );

  await row.getByRole("button", { name: "Reinstate Jory Trevaskis" }).click();
  // Reinstated, it leaves the list of the suspended.
  await expect(row).toHaveCount(0);
  await page.getByLabel(/^Suspended only/).uncheck();
  await expect(row.getByRole("button", { name: "Suspend Jory Trevaskis…" })).toBeVisible();
  await expect(row.getByText(/^Suspended/)).toHaveCount(0);
  await signInAs();
  await expect(phone.getByRole("button", { name: "Sign out" })).toBeVisible();
  // Made an instance admin, and no longer one (each asks first).
  page.on("dialog", (d) => void d.accept());
  await row.getByRole("button", { name: "Make instance admin" }).click();
  await expect(row.getByText("Instance admin", { exact: true })).toBeVisible();
  await row.getByRole("button", { name: "Remove instance admin" }).click();
  await expect(row.getByText("Instance admin", { exact: true })).toHaveCount(0);
  // An admin's own row offers no suspension.
  await expect(
    page
      .getByTestId("account")
      .filter({ hasText: "admin@tideline.test" })
      .getByRole("button", { name: /^Suspend/ }),
  ).toHaveCount(0);
  await phoneCtx.close();
});
