import { expect, test, type Page } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";
import { curatorApi, makeRtsBoard } from "./support/rts-board";

/**
 * Return to service end to end, on a board of its own (so the test does not depend on other tests or on
 * a retry): the curator builds a two-stage plan from the template, sees the gate blocked with
 * its reasons, fixes them (names the qualified person, records the missing insulation reading),
 * signs the hold points as a qualified person and energises; a volunteer on a phone records a
 * watch check with a dark lamp; the incident's defect appears in the register and the stage is
 * stopped. The demo curator, Ines Marrow (invented), is a qualified person in the demo.
 */
const stamp = Date.now().toString(36);
const BOARD = `Test board ${stamp}`;
const TIE = `BT-${stamp}`;
const FEEDER = `F-${stamp}`;
const STAGE_1 = "Bus tie at reduced voltage";
const STAGE_2 = "Feeders at full voltage";

const stageCard = (page: Page, name: string) =>
  page.getByTestId("stage").filter({ has: page.getByRole("heading", { name: new RegExp(`^Stage \\d+: ${name}$`) }) });
const hold = (page: Page, stage: string, kind: string) => stageCard(page, stage).getByTestId(`hold-${kind}`);

test("the curator plans two stages, fixes the gate's blockers and energises; a volunteer's dark lamp on a phone stops the stage and opens a defect", async ({
  page,
  browser,
  baseURL,
}) => {
  test.setTimeout(360_000); // many saves and four accessibility scans on a shared, loaded machine
  await signIn(page, "curator");
  const siteId = page.url().match(/sites\/([0-9a-f-]{36})/)![1];
  const api = await curatorApi(baseURL!);
  const boardId = await makeRtsBoard(api, siteId, { board: BOARD, tie: TIE, feeder: FEEDER });

  // The overview names the new board with no plan yet.
  await page.goto(`/sites/${siteId}/return-to-service`);
  await expect(page.getByRole("heading", { level: 1, name: "Return to service" })).toBeVisible();
  await expect(page.getByTestId("rts-caution")).toContainText("never authorises energisation");
  await expect(page.getByTestId("rts-board").filter({ hasText: BOARD })).toContainText("No plan yet");
  await page.getByRole("link", { name: BOARD }).click();
  await expect(page.getByRole("heading", { level: 1, name: `Return to service · ${BOARD}` })).toBeVisible();
  await expect(page.getByText("No stages planned yet.")).toBeVisible();

  // Stage 1 from the template, without a qualified person.
  await page.getByRole("button", { name: "Add a stage" }).click();
  let form = page.getByRole("form", { name: "New stage" });
  await form.getByLabel("Stage name").fill(STAGE_1);
  await form.getByRole("checkbox", { name: "Bus tie" }).check();
  await form.getByLabel("Voltage step").selectOption({ label: "Reduced voltage" });
  await form.getByLabel("Volts at this step").fill("230");
  await form.getByRole("button", { name: "Add the stage" }).click();
  await expect(stageCard(page, STAGE_1)).toBeVisible();

  // Stage 2 depends on stage 1, with the qualified person named.
  await page.getByRole("button", { name: "Add a stage" }).click();
  form = page.getByRole("form", { name: "New stage" });
  await form.getByLabel("Stage name").fill(STAGE_2);
  await form.getByRole("checkbox", { name: "Feeders" }).check();
  await form.getByLabel("Qualified person").selectOption({ label: "Ines Marrow" });
  await form.getByLabel("Depends on").selectOption({ label: STAGE_1 });
  await form.getByRole("button", { name: "Add the stage" }).click();
  await expect(stageCard(page, STAGE_2)).toBeVisible();

  // Both took the template's ten hold points.
  await expect(stageCard(page, STAGE_1).locator("[data-testid^='hold-']")).toHaveCount(10);
  // A stage cannot go ahead of the one it depends on.
  await stageCard(page, STAGE_2).getByRole("button", { name: "Earlier" }).click();
  await expect(stageCard(page, STAGE_2).getByRole("alert")).toContainText("depends on");

  // The gate is blocked, and says why, with links.
  const one = stageCard(page, STAGE_1);
  await expect(one.getByTestId("stage-state")).toHaveText("Blocked");
  await expect(hold(page, STAGE_1, "insulation")).toContainText(`${TIE}: no insulation reading recorded.`);
  await expect(hold(page, STAGE_1, "energise")).toContainText("No qualified person named for this stage.");
  await expect(stageCard(page, STAGE_2).getByTestId("hold-energise")).toContainText(`Waits for “${STAGE_1}”`);
  await expectNoSeriousA11yViolations(page, "return to service: a plan blocked");

  // Fix 1: name the qualified person.
  await one.getByRole("button", { name: "Edit the stage" }).click();
  form = page.getByRole("form", { name: `Edit stage ${STAGE_1}` });
  await form.getByLabel("Qualified person").selectOption({ label: "Ines Marrow" });
  await form.getByRole("button", { name: "Save the stage" }).click();
  await expect(hold(page, STAGE_1, "energise")).not.toContainText("No qualified person named");
  await expect(one).toContainText("Qualified person: Ines Marrow");

  // Fix 2: the blocker's link leads to the bus tie's readings; record the missing reading there.
  await hold(page, STAGE_1, "insulation")
    .getByRole("link", { name: /no insulation reading recorded/ })
    .click();
  const ir = page.getByRole("form", { name: "Record an insulation-resistance reading" });
  await ir.getByLabel("Reading (MΩ)").fill("800");
  await ir.getByLabel("Equipment temperature (°C)").fill("20");
  await ir.getByRole("button", { name: "Save reading" }).click();
  await expect(page.getByRole("status").filter({ hasText: "Saved:" })).toContainText("Meets the recorded criterion");
  await page.goto(`/sites/${siteId}/boards/${boardId}/return-to-service`);
  await expect(one.getByTestId("stage-state")).not.toHaveText("Blocked");
  await expect(hold(page, STAGE_1, "insulation")).not.toContainText("no insulation reading");
  await expect(hold(page, STAGE_1, "insulation")).toContainText("Waiting"); // for the hold point before it

  // Sign the hold points as the qualified person, then energise.
  // Each signature asks once more, with room for what was checked; a mistake is struck out with a reason.
  for (const kind of ["isolate", "insulation", "defects", "protection", "clearance"]) {
    const row = hold(page, STAGE_1, kind);
    await row.getByRole("button", { name: "Sign this hold point…" }).click();
    if (kind === "protection") await row.getByLabel(/^Note/).fill("20 A fuses in the fused disconnect");
    await row.getByRole("button", { name: "Sign", exact: true }).click();
    await expect(row).toContainText("Signed by Ines Marrow");
  }
  await expect(hold(page, STAGE_1, "protection")).toContainText("20 A fuses in the fused disconnect");
  const clear = hold(page, STAGE_1, "clearance");
  await clear.getByRole("button", { name: /^Strike out the entry/ }).click();
  await clear.getByRole("button", { name: "Strike it out" }).click();
  await expect(clear.getByText("Say why the entry is corrected")).toBeVisible(); // supersedeBody's own words
  await clear.getByLabel(/^Why strike it out/).fill("Signed before the last person came up the ladder");
  await clear.getByRole("button", { name: "Strike it out" }).click();
  await expect(clear).toContainText("Struck out by Ines Marrow");
  await expect(one.getByTestId("stage-state")).not.toHaveText("Hold points met up to energising");
  await clear.getByRole("button", { name: "Sign this hold point…" }).click();
  await clear.getByRole("button", { name: "Sign", exact: true }).click();
  await expect(one.getByTestId("stage-state")).toHaveText("Hold points met up to energising");
  await hold(page, STAGE_1, "energise").getByRole("button", { name: "Sign: energised now…" }).click();
  await hold(page, STAGE_1, "energise").getByRole("button", { name: "Sign: energised now" }).click();
  await expect(one.getByTestId("stage-state")).toHaveText("Live, under watch");
  await expect(one.getByTestId("watch-state")).toContainText("Next watch check due");
  await expect(page.getByRole("list", { name: "Log" })).toContainText(`Energised: ${STAGE_1}`);
  await expect(page.getByRole("figure", { name: "Timeline of the return to service" })).toBeVisible();
  await expectNoSeriousA11yViolations(page, "return to service: a stage live");

  // The printable stage sheet has a blank line per hold point for the clipboard.
  await one.getByRole("link", { name: "Printable stage sheet" }).click();
  await expect(page.getByRole("heading", { name: new RegExp(`Stage: ${STAGE_1}`) })).toBeVisible();
  await expect(page.getByRole("row")).toHaveCount(11);
  await expect(page.getByText("it does not authorise energisation")).toBeVisible();

  // A volunteer on a phone records a watch check: one lamp dark on phase B.
  const phone = await browser.newContext({ viewport: { width: 360, height: 740 }, baseURL });
  const vol = await phone.newPage();
  await signIn(vol, "volunteer");
  await vol.goto(`/sites/${siteId}/boards/${boardId}/watch`);
  await expect(vol.getByRole("heading", { level: 1, name: "Watch check" })).toBeVisible();
  await expect(vol.getByTestId("rts-caution")).toBeVisible();
  await expect(vol.getByText(STAGE_1)).toBeVisible();
  await vol.getByRole("button", { name: "One dark" }).click();
  await vol.getByRole("button", { name: "B", exact: true }).click();
  await vol.getByLabel("Note").fill("Phase B lamp went out two minutes after the check began");
  await expectNoSeriousA11yViolations(vol, "watch check on a phone");
  await vol.getByRole("button", { name: "Save the check" }).click();
  const said = vol.getByRole("status").filter({ hasText: "Incident recorded" });
  await expect(said).toContainText("the stage is stopped");
  const ref = (await said.textContent())!.match(/D-\d+/)![0];

  // The incident's defect is in the register, safety-critical.
  await vol.goto(`/sites/${siteId}/defects?q=${encodeURIComponent("Ground lamp dark on phase B")}`);
  await expect(vol.getByText(/Return to service incident: Ground lamp dark on phase B/).first()).toBeVisible();
  await expect(vol.getByText(ref).first()).toBeVisible();
  await phone.close();

  // The curator sees the stage stopped, the incident in the log, and the stage after it still waiting.
  await page.goto(`/sites/${siteId}/boards/${boardId}/return-to-service`);
  await expect(one.getByTestId("stage-state")).toHaveText("Stopped by an incident");
  await expect(page.getByRole("list", { name: "Log" })).toContainText("Incident: Ground lamp dark");
  await expect(stageCard(page, STAGE_2).getByTestId("stage-state")).toHaveText("Blocked");
  await page.goto(`/sites/${siteId}/return-to-service`);
  await expect(page.getByTestId("rts-board").filter({ hasText: BOARD })).toContainText(
    `1. ${STAGE_1}: Stopped by an incident`,
  );
  await expectNoSeriousA11yViolations(page, "return to service overview");
  await api.dispose();
});
