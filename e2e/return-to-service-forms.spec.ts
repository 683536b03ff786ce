import { expect, test } from "@playwright/test";
import { signIn } from "./support/auth";
import { curatorApi, makeRtsBoard } from "./support/rts-board";

/**
 * The return-to-service forms on the one form pattern, on a phone, as the curator and on a board of its own:
 * each form's schema (the one its route parses with) or the server names what is wrong beside the field,
 * the input stays, and a corrected save goes through — new stage and its edit, a release with a reason,
 * adding and rewording hold points, a breaker operation and its budget, a qualification, the template.
 */
const stamp = Date.now().toString(36);
const BOARD = `Test board ${stamp}`;
const TIE = `BT-${stamp}`;
const FEEDER = `F-${stamp}`;

test.use({ viewport: { width: 360, height: 740 } });

test("the return-to-service forms show the schema's messages beside the fields and save", async ({ page, baseURL }) => {
  test.setTimeout(360_000);
  await signIn(page, "curator");
  const siteId = page.url().match(/sites\/([0-9a-f-]{36})/)![1];
  const api = await curatorApi(baseURL!);
  const boardId = await makeRtsBoard(api, siteId, { board: BOARD, tie: TIE, feeder: FEEDER });
  await page.goto(`/sites/${siteId}/boards/${boardId}/return-to-service`);

  // Stage form: nothing brought back, hours not a number.
  await page.getByRole("button", { name: "Add a stage" }).click();
  const form = page.getByRole("form", { name: "New stage" });
  await form.getByLabel("Stage name").fill("Scratch stage");
  await form.getByLabel("Watch period (h)").fill("x");
  await form.getByLabel("And named circuits").fill("NOPE");
  await expect(form.getByText("Not on this board: NOPE")).toBeVisible();
  await form.getByLabel("And named circuits").fill("");
  await form.getByRole("button", { name: "Add the stage" }).click();
  await expect(form.getByText("Hours as a number")).toBeVisible();
  await form.getByLabel("Watch period (h)").scrollIntoViewIfNeeded();
  await form.getByLabel("Watch period (h)").fill("12");
  await form.getByRole("button", { name: "Add the stage" }).click();
  await expect(form.getByText("Name at least one section or circuit the stage brings back")).toBeVisible();
  await form.getByRole("checkbox", { name: "Feeders" }).check();
  await form.getByLabel("Watch period (h)").fill("12");
  await form.getByRole("button", { name: "Add the stage" }).click();
  await expect(form).toHaveCount(0);
  const card = page.getByTestId("stage").filter({ hasText: "Scratch stage" });
  await expect(card).toBeVisible();
  await expect(card).toContainText("12 h, a check every 4 h");

  // Edit: the server's 409 or messages; here just a rename.
  await card.getByRole("button", { name: "Edit the stage" }).click();
  const edit = page.getByRole("form", { name: "Edit stage Scratch stage" });
  await edit.getByLabel("A watch check every (h)").fill("0.1");
  await edit.getByRole("button", { name: "Save the stage" }).click();
  await expect(edit.getByText("At least every 15 minutes")).toBeVisible();
  await edit.getByLabel("A watch check every (h)").fill("2");
  await edit.getByRole("button", { name: "Save the stage" }).click();
  await expect(card).toContainText("12 h, a check every 2 h");

  // Release a blocked hold point with a reason.
  const ins = card.getByTestId("hold-insulation");
  await ins.getByRole("button", { name: "Release with a reason…" }).click();
  const rel = ins.getByRole("form");
  await rel.getByLabel(/Reason/).fill("short");
  await rel.getByRole("button", { name: "Release this hold point" }).click();
  await expect(rel.getByText(/at least a sentence/)).toBeVisible();
  await rel.getByLabel(/Reason/).fill("Spare feeder, cable disconnected at the terminals.");
  await rel.getByRole("button", { name: "Release this hold point" }).click();
  await expect(card).toContainText("Released with reason");
  await expect(ins.getByRole("form")).toHaveCount(0);

  // Hold points: add one (the kind names it), reword one.
  await card.getByRole("button", { name: "Edit hold points" }).click();
  const before = await card.locator("[data-testid^='hold-']").count();
  await card.getByRole("button", { name: "Add a hold point" }).click();
  const add = card.getByRole("form", { name: /Add a hold point/ });
  await add.getByRole("button", { name: "Add the hold point" }).click();
  await expect(add.getByText("Say what the hold point is")).toBeVisible();
  const kinds = await add.getByLabel("Kind").locator("option").allTextContents();
  await add.getByLabel("Kind").selectOption({ index: 1 });
  await expect(add.getByLabel("Hold point")).toHaveValue(kinds[1]);
  await add.getByLabel("Place").selectOption({ label: "At the end" });
  await add.getByRole("button", { name: "Add the hold point" }).click();
  await expect(add).toHaveCount(0);
  await expect(card.locator("[data-testid^='hold-']")).toHaveCount(before + 1);
  await card
    .getByRole("button", { name: /^Edit hold point:/ })
    .first()
    .click();
  const words = card.getByRole("form", { name: /^Edit hold point / });
  await words.getByLabel("Hold point").fill("x");
  await words.getByRole("button", { name: "Save the hold point" }).click();
  await expect(words.getByText("Say what the hold point is")).toBeVisible();
  await words.getByLabel("Hold point").fill("Isolate and lock off, checked twice");
  await words.getByRole("button", { name: "Save the hold point" }).click();
  await expect(card).toContainText("Isolate and lock off, checked twice");

  // Breaker operations: none yet is said in words (not an empty table); why missing, then recorded; a budget not a
  // whole number, then saved.
  await expect(page.getByTestId("no-operations-yet")).toBeVisible();
  const op = page.getByRole("form", { name: "Record a breaker operation" }).first();
  await op.getByLabel("Breaker").selectOption({ index: 1 });
  await op.getByRole("button", { name: "Record the operation" }).click();
  await expect(op.getByText("Say why it was operated")).toBeVisible();
  await op.getByLabel("Why").fill("Scratch check of the form");
  await op.getByRole("radio", { name: "Opened" }).check();
  await op.getByRole("button", { name: "Record the operation" }).click();
  await expect(op.getByRole("status")).toContainText("opened (1 of");
  await expect(op.getByLabel("Why")).toHaveValue("");
  await page.getByRole("button", { name: /Change the budget of BT-/ }).click();
  const budget = page.getByRole("form", { name: /Operations budget of BT-/ });
  await budget.getByLabel("Budget").fill("1.5");
  await budget.getByRole("button", { name: "Save" }).click();
  await expect(budget.getByText("A whole number of operations")).toBeVisible();
  await budget.getByLabel("Budget").fill("40");
  await budget.getByLabel("Reason").fill("Scratch");
  await budget.getByRole("button", { name: "Save" }).click();
  await expect(budget).toHaveCount(0);
  await expect(page.getByTestId(/breaker-BT-/)).toContainText("40");
  // On the phone the breakers are a list read top to bottom, not a seven-column table scrolled sideways.
  await expect(page.getByRole("list", { name: "Breaker operations against their budgets" })).toBeVisible();
  await expect(page.getByRole("table", { name: "Breaker operations against their budgets" })).toHaveCount(0);

  // Qualified persons (crew page): the qualification is asked for beside its field.
  await page.goto(`/sites/${siteId}/members`);
  await page.getByRole("button", { name: "Mark as qualified person" }).first().click();
  const qp = page.getByRole("form", { name: /Qualification of/ });
  await qp.getByRole("button", { name: "Save" }).click();
  await expect(qp.getByText("Say what the qualification is")).toBeVisible();
  await qp.scrollIntoViewIfNeeded();

  // The hold-point template: days and a blank hold point are named beside their fields; a save says so.
  await page.goto(`/sites/${siteId}/return-to-service/settings`);
  const t = page.getByRole("form", { name: "Hold-point template" });
  await t.getByLabel("An insulation reading counts for (days)").fill("abc");
  await t.getByLabel("Hold point (2)").fill("");
  await t.getByRole("button", { name: "Save the template" }).click();
  await expect(t.getByText("Days as a whole number")).toBeVisible();
  await expect(t.getByText("Say what the hold point is")).toBeVisible();
  await page.reload();
  await t.getByRole("button", { name: "Save the template" }).click();
  await expect(t.getByRole("status")).toContainText("Saved.");
  await t.getByRole("button", { name: "Move down" }).first().click();
  await expect(t.getByRole("status")).toHaveCount(0);
  await t.getByRole("button", { name: "Move up" }).nth(1).click();
});
