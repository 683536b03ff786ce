import { expect, test, type Page } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { DEMO_SITE, signIn } from "./support/auth";
import { adminApi, linkIn, uniqueEmail, waitForMail } from "./support/mailbox";

async function openCrewPage(page: Page) {
  await signIn(page, "curator");
  await page.getByRole("link", { name: "Crew" }).first().click();
  await expect(page.getByRole("heading", { name: `Crew on ${DEMO_SITE}` })).toBeVisible();
}

async function invite(page: Page, email: string, role = "Volunteer") {
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Role on this site").selectOption({ label: role });
  await page.getByRole("button", { name: "Send invitation" }).click();
  // The e-mail goes out from the job queue's outbox a moment after the invitation is saved.
  await expect(page.getByRole("status").filter({ hasText: `Invitation to ${email} saved` })).toBeVisible();
}

test("a curator invites a newcomer; the newcomer follows the e-mailed link, sets a password, lands on the site and signs in again", async ({
  page,
  browser,
  baseURL,
}) => {
  const email = uniqueEmail("newcomer");
  await openCrewPage(page);
  await invite(page, email);
  const row = page.getByTestId("pending-invitation").filter({ hasText: email });
  await expect(row).toContainText("✓ Sent");
  await expectNoSeriousA11yViolations(page, "crew page with invitations");

  const api = await adminApi(baseURL!);
  const msg = await waitForMail(api, email, /invited/);
  expect(msg.html).toContain("/invite/");
  const link = linkIn(msg, "/invite/");

  const ctx = await browser.newContext();
  const guest = await ctx.newPage();
  await guest.goto(link);
  await expect(guest.getByRole("heading", { name: `Join the ${DEMO_SITE} crew` })).toBeVisible();
  await expect(guest.getByText("Volunteer", { exact: true })).toBeVisible();
  await expectNoSeriousA11yViolations(guest, "invitation page");
  await guest.getByLabel("Your name, as the crew knows you").fill("Wren Tallowby");
  await guest.getByLabel("Choose a password").fill("bilge-pump-lantern");
  await guest.getByRole("button", { name: "Join the crew" }).click();
  await expect(guest.getByTestId("site-name")).toHaveText(DEMO_SITE);
  await expect(guest.getByRole("heading", { level: 1, name: "Teardown log" })).toBeVisible();

  await guest.getByRole("button", { name: "Sign out" }).click();
  await guest.getByLabel("E-mail").fill(email);
  await guest.getByLabel("Password").fill("bilge-pump-lantern");
  await guest.getByRole("button", { name: "Sign in" }).click();
  await expect(guest.getByTestId("user-name")).toHaveText("Wren Tallowby");

  // The link worked once; opened again it says why it no longer does.
  await guest.goto(link);
  await expect(guest.getByRole("alert")).toContainText("already been used");
  await ctx.close();
  await api.dispose();
});

test("the curator revokes a pending invitation and its link stops working", async ({ page, baseURL }) => {
  const email = uniqueEmail("withdrawn");
  await openCrewPage(page);
  await invite(page, email, "Viewer");
  const api = await adminApi(baseURL!);
  const link = linkIn(await waitForMail(api, email, /invited/), "/invite/");
  page.once("dialog", (d) => void d.accept());
  await page.getByRole("button", { name: `Revoke the invitation for ${email}` }).click();
  await expect(page.getByTestId("pending-invitation").filter({ hasText: email })).toHaveCount(0);
  await page.goto(link);
  await expect(page.getByRole("alert")).toContainText("withdrawn");
  await api.dispose();
});

test("an instance admin reads the local mailbox and opens an invitation from it", async ({ page, baseURL }) => {
  const email = uniqueEmail("mailbox");
  const api = await adminApi(baseURL!);
  const site = (await (await api.get("/api/sites")).json()).sites[0].id as string;
  expect((await api.post(`/api/sites/${site}/invitations`, { data: { email, role: "photographer" } })).status()).toBe(
    201,
  );
  await signIn(page, "admin");
  await page.getByRole("link", { name: "Admin", exact: true }).click();
  await page.getByRole("link", { name: "Local mailbox" }).click();
  await expect(page.getByRole("heading", { name: "Local mailbox" })).toBeVisible();
  await page.getByRole("button", { name: new RegExp(`to ${email}`) }).click();
  await expect(page.getByRole("heading", { level: 2, name: /invited/ })).toBeVisible();
  await expectNoSeriousA11yViolations(page, "mailbox page");
  await page.getByRole("button", { name: "HTML part" }).click();
  await expect(page.frameLocator("iframe").getByRole("link", { name: "Join the crew" })).toBeVisible();
  await page.screenshot({ path: "/tmp/email-mailbox-desktop.png", fullPage: true });
  await page.getByRole("link", { name: /\/invite\// }).click();
  await expect(page.getByRole("heading", { name: `Join the ${DEMO_SITE} crew` })).toBeVisible();
  await api.dispose();
});

test("an address that already has an account gets the same invitation and joins only when it accepts with its password", async ({
  page,
  browser,
  baseURL,
}) => {
  const email = uniqueEmail("has-account");
  const api = await adminApi(baseURL!);
  const created = await api.post("/api/admin/users", {
    data: { email, name: "Oriel Fathomley", password: "deckhouse-compass-rose", isAdmin: false },
  });
  expect(created.status()).toBe(201);

  await openCrewPage(page);
  await invite(page, email, "Viewer"); // the same answer as for a newcomer: nothing says the address has an account
  await expect(page.getByRole("listitem").filter({ hasText: "Oriel Fathomley" })).toHaveCount(0);

  const link = linkIn(await waitForMail(api, email, /invited/), "/invite/");
  const ctx = await browser.newContext();
  const guest = await ctx.newPage();
  await guest.goto(link);
  await expect(guest.getByText("This address already has a Tideline account")).toBeVisible();
  await guest.getByLabel("Password").fill("deckhouse-compass-rose");
  await guest.getByRole("button", { name: "Sign in and join" }).click();
  await expect(guest.getByTestId("site-name")).toHaveText(DEMO_SITE);
  await expect(guest.getByTestId("user-name")).toHaveText("Oriel Fathomley");
  await ctx.close();
  await api.dispose();
});

test("a viewer who opens the crew page reads who may sign the energisation, and is offered nothing their role is refused", async ({
  page,
}) => {
  await signIn(page, "viewer");
  await page.waitForURL(/\/sites\/[^/]+/);
  const siteUrl = page.url().match(/\/sites\/[^/]+/)![0];
  await page.goto(`${siteUrl}/members`);
  await expect(page.getByRole("heading", { name: /^Crew on / })).toBeVisible();
  await expect(page.getByRole("heading", { name: "Qualified persons for energisation" })).toBeVisible();
  await expect(page.getByText("Ines Marrow")).toBeVisible();
  await expect(page.getByRole("alert")).toHaveCount(0);
  await expect(
    page.getByRole("button", { name: /Send invitation|Mark as qualified person|Edit qualification/ }),
  ).toHaveCount(0);
  await expect(page.getByRole("combobox")).toHaveCount(0);
  // The same on the watch page of the demo's live stage: when the check is due, and no lamp buttons to press.
  const boards = (await (await page.request.get(`/api${siteUrl}/boards`)).json()) as
    Array<{ id: string; name: string }> | { boards: Array<{ id: string; name: string }> };
  const main = (Array.isArray(boards) ? boards : boards.boards).find((b) => b.name.startsWith("Main switchboard"))!;
  await page.goto(`${siteUrl}/boards/${main.id}/watch`);
  await expect(page.getByText("Your role reads the watch; volunteers and the curator record checks.")).toBeVisible();
  await expect(page.getByRole("form", { name: "Watch check" })).toHaveCount(0);
  await expect(page.getByRole("checkbox")).toHaveCount(0);
});
