import { expect, request, test, type APIRequestContext } from "@playwright/test";
import sharp from "sharp";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { DEMO_PASSWORD, signIn } from "./support/auth";

/**
 * Each test makes its own small board through the API as the curator (the e2e database is
 * shared and tests must not depend on order), then drives the screens as a person would.
 * The board is 2000 mm tall in 4 rows with the flood line at 600 mm: row 4 was under water.
 */
interface Made {
  siteId: string;
  boardId: string;
  prefix: string;
}

async function curatorApi(baseURL: string): Promise<APIRequestContext> {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: { Origin: baseURL } });
  const r = await api.post("/api/auth/sign-in", { data: { email: "curator@tideline.test", password: DEMO_PASSWORD } });
  expect(r.ok()).toBeTruthy();
  return api;
}

async function makeBoard(baseURL: string): Promise<Made> {
  const api = await curatorApi(baseURL);
  const sites = (await (await api.get("/api/sites")).json()) as { sites: Array<{ id: string }> };
  const siteId = sites.sites[0].id;
  const prefix = `Z${Date.now().toString(36).slice(-5).toUpperCase()}-`;
  const board = await api.post(`/api/sites/${siteId}/boards`, {
    data: { name: `Test board ${prefix}`, faceHeightMm: 2000, waterLineMm: 600, gridRows: 4, gridCols: 6 },
  });
  expect(board.status()).toBe(201);
  const { id: boardId } = (await board.json()) as { id: string };
  const gen = await api.post(`/api/sites/${siteId}/boards/${boardId}/positions/generate`, {
    data: { prefix, from: 1, to: 3, gridRow: 4, startCol: 1, kind: "molded_case_breaker" },
  });
  expect(gen.status()).toBe(201);
  await api.dispose();
  return { siteId, boardId, prefix };
}

test.describe("on a phone", () => {
  test.use({ viewport: { width: 360, height: 740 } });

  test("a volunteer logs an inspection with a photo and a removal through the quick log, and the board tile shows both", async ({
    page,
    baseURL,
  }) => {
    const m = await makeBoard(baseURL!);
    const designation = `${m.prefix}2`;
    await signIn(page, "volunteer");
    await page.getByRole("navigation", { name: "Site (phone)" }).getByRole("link", { name: "Quick log" }).click();
    await expect(page.getByRole("heading", { level: 1, name: "Quick log" })).toBeVisible();

    await page.getByLabel("Designation or tag number").fill(designation);
    await page
      .getByRole("list", { name: "Matching positions" })
      .getByRole("button", { name: new RegExp(designation) })
      .click();
    await expect(page.getByTestId("log-designation")).toHaveText(designation);

    // row 4 of a 4-row, 2000 mm face reaches 0–500 mm, under the 600 mm line: prefilled "below"
    await expect(page.getByRole("button", { name: "Yes, below" })).toHaveAttribute("aria-pressed", "true");
    await page.getByLabel("Surface rusted (%)").fill("12");
    // ASTM D610-08 Table 1: 12 % lies in "> 10 up to 16" → grade 3; ISO 4628-3 nearest point 8 % → Ri 4
    await expect(page.locator("#percent-grade")).toContainText("grade 3");
    await expect(page.locator("#percent-grade")).toContainText("Ri 4");
    await page.getByRole("button", { name: "Salt crust" }).click();
    await page.getByRole("button", { name: "Not tried" }).click();
    await expectNoSeriousA11yViolations(page, "quick log form");
    await page.getByRole("button", { name: "Save inspection" }).click();
    await expect(page.getByTestId("logged")).toContainText("Inspection saved — grade 3 · Ri 4");
    await expect(page.getByRole("link", { name: "Raise a defect" })).toHaveAttribute("href", /category=corrosion/);
    // The inspection's photo, from the phone's camera input.
    const photos = page.getByRole("region", { name: "Photos of this inspection" });
    const shot = await sharp({ create: { width: 320, height: 240, channels: 3, background: "#7a5a3a" } })
      .jpeg()
      .toBuffer();
    await photos
      .locator("input[type=file]")
      .setInputFiles({ name: "salt-crust.jpg", mimeType: "image/jpeg", buffer: shot });
    await expect(photos.getByRole("button", { name: /^Open photo/ })).toHaveCount(1);

    await page.getByRole("tab", { name: "Move the part" }).click();
    await expect(page.getByRole("button", { name: "Removed (tagged)", exact: true })).toHaveAttribute(
      "aria-pressed",
      "true",
    );
    await page.getByLabel("Tag number on the bag").fill(`T-${m.prefix}2`);
    await page.getByLabel("Where is it now?").fill("Crate B, engine-room flat");
    await page.getByRole("button", { name: /Save move/ }).click();
    await expect(page.getByTestId("logged")).toContainText("Move saved — now Removed (tagged)");
    await expect(page.getByTestId("custody-now")).toHaveText("Removed (tagged)");

    await page.getByRole("link", { name: "See it on the board" }).click();
    const tile = page.getByTestId(`tile-${designation}`);
    await expect(tile).toContainText("G3");
    await expect(tile).toContainText("out · tagged");
    await expect(page.getByTestId("position-panel")).toContainText("Crate B, engine-room flat");
  });
});

test("the curator overrides a disposition with a reason; the tile and the position history update", async ({
  page,
  baseURL,
}) => {
  const m = await makeBoard(baseURL!);
  const designation = `${m.prefix}1`;
  await signIn(page, "curator");
  await page.goto(`/sites/${m.siteId}/boards/${m.boardId}`);
  const tile = page.getByTestId(`tile-${designation}`);
  await expect(tile).toContainText("undecided");

  // arrow keys move between tiles, Enter opens one
  await page.getByTestId(`tile-${m.prefix}2`).focus();
  await page.keyboard.press("ArrowLeft");
  await expect(tile).toBeFocused();
  await page.keyboard.press("Enter");
  const panel = page.getByTestId("position-panel");
  await expect(panel.getByRole("heading", { name: designation })).toBeVisible();

  const recommended = (await panel.getByTestId("recommendation").locator("strong").innerText()).trim();
  const choice = recommended === "Rebuild" ? "Replace" : "Rebuild";
  await panel.getByRole("radio", { name: new RegExp(`^${choice}`) }).check();
  await panel.getByRole("button", { name: "Save override" }).click();
  await expect(panel.getByText("Say why you are overriding the recommendation")).toBeVisible();
  await panel.getByLabel(/Why override/).fill("Keep the original breaker: rebuild under the qualified electrician.");
  await panel.getByRole("button", { name: "Save override" }).click();
  await expect(panel.getByRole("status").filter({ hasText: "Saved." })).toBeVisible();

  await expect(tile).toContainText(choice.toLowerCase());
  await expect(tile).toHaveAttribute("aria-label", new RegExp(`${choice} \\(override\\)`));
  await expect(panel.getByTestId("position-history")).toContainText(choice.toLowerCase());
  await expect(panel).toContainText("Keep the original breaker");
  await expectNoSeriousA11yViolations(page, "board elevation with the position panel");
});

test("filters dim the tiles that do not match, without hiding them", async ({ page, baseURL }) => {
  const m = await makeBoard(baseURL!);
  await signIn(page, "viewer");
  await page.goto(`/sites/${m.siteId}/boards/${m.boardId}`);
  const tile = page.getByTestId(`tile-${m.prefix}1`);
  await expect(tile).toBeVisible();
  await page.getByLabel("Kind", { exact: true }).selectOption("meter");
  await expect(tile).toHaveAttribute("data-dimmed", "true");
  await expect(tile).toBeVisible();
  await page.getByLabel("Kind", { exact: true }).selectOption("molded_case_breaker");
  await expect(tile).not.toHaveAttribute("data-dimmed", "true");
  // a viewer sees no write controls
  await expect(page.getByRole("link", { name: "Set up this board" })).toHaveCount(0);
  await tile.click();
  const panel = page.getByTestId("position-panel");
  await expect(panel.getByRole("heading", { name: "Disposition" })).toBeVisible();
  await expect(panel.getByRole("radio")).toHaveCount(0);
  await expect(panel.getByRole("link", { name: "Log inspection or move" })).toHaveCount(0);
  await expectNoSeriousA11yViolations(page, "board elevation");
});

test("the board list draws each board's thumbnail from its compact read, never from the board's pages", async ({
  page,
  baseURL,
}) => {
  const m = await makeBoard(baseURL!);
  const asked: string[] = [];
  page.on("request", (r) => {
    const path = new URL(r.url()).pathname;
    if (path.startsWith("/api/sites/")) asked.push(path);
  });
  await signIn(page, "viewer");
  await page.goto(`/sites/${m.siteId}/boards`);
  const card = page
    .locator("li, article, section")
    .filter({ has: page.getByRole("link", { name: `Test board ${m.prefix}` }) })
    .last();
  await card.scrollIntoViewIfNeeded();
  const thumb = card.getByTestId("board-thumbnail");
  await expect(thumb).toHaveAttribute("data-cells", "3"); // the three generated positions
  expect(asked).toContain(`/api/sites/${m.siteId}/boards/${m.boardId}/thumbnail`);
  expect(asked.filter((p) => /\/boards\/[^/]+(\/tiles)?$/.test(p))).toEqual([]); // no board read whole or in pages
  await page.screenshot({ path: ".data/test-results/board-list-thumbnails.png" });
});

test("every role sees the survey progress on the site overview, and it passes the accessibility scan", async ({
  page,
}) => {
  await signIn(page, "viewer");
  const summary = page.getByTestId("progress-summary");
  await expect(summary.getByRole("heading", { name: "Survey progress" })).toBeVisible();
  await expect(summary.getByTestId("surveyed-count")).toContainText("/");
  await expect(summary.getByRole("region", { name: "By disposition" })).toContainText("Not decided");
  await expectNoSeriousA11yViolations(page, "site overview");
});

test("the curator sets up a board: new board, a generated row, reorder from the keyboard, nameplate by kind", async ({
  page,
}) => {
  test.setTimeout(120_000); // four axe scans on a 2-core machine shared with other checkouts
  const prefix = `N${Date.now().toString(36).slice(-4).toUpperCase()}-`;
  await signIn(page, "curator");
  await page.getByRole("navigation", { name: "Site" }).getByRole("link", { name: "Boards" }).click();
  await expect(page.getByRole("heading", { level: 1, name: /Boards on/ })).toBeVisible();
  await expectNoSeriousA11yViolations(page, "board list");
  await page.getByRole("link", { name: "New board" }).click();
  await page.getByLabel("Name", { exact: true }).fill(`Shore panel ${prefix}`);
  await page.getByLabel("Grid rows").fill("3");
  await page.getByLabel("Grid columns").fill("4");
  await expectNoSeriousA11yViolations(page, "new board form");
  await page.getByRole("button", { name: "Create board" }).click();
  await expect(page.getByRole("heading", { level: 1, name: `Set up Shore panel ${prefix}` })).toBeVisible();

  const row = page.getByRole("form", { name: "Generate a row of positions" });
  await row.getByLabel("Prefix", { exact: true }).fill(prefix);
  await row.getByLabel("To", { exact: true }).fill("3");
  await row.getByLabel("Kind", { exact: true }).selectOption("meter");
  await row.getByRole("button", { name: /^Create/ }).click();
  await expect(row.getByRole("status")).toHaveText("Created 3 positions.");
  const list = page.getByRole("region", { name: "Positions, in list order" });
  await expect(list.getByTestId(`order-${prefix}3`)).toBeVisible();

  // The list moves at once and saves behind it: wait for the save before reloading (a reload would cancel it).
  const saved = () => page.waitForResponse((r) => r.url().endsWith("/positions/reorder") && r.ok());
  let save = saved();
  await list.getByRole("button", { name: `Move ${prefix}3 up` }).click();
  await expect(list.locator("li").nth(1)).toHaveAttribute("data-testid", `order-${prefix}3`);
  await save;
  await expect(list.getByRole("status")).toHaveText("Order saved.");
  await page.reload();
  await expect(list.locator("li").nth(1)).toHaveAttribute("data-testid", `order-${prefix}3`);
  // and by dragging: 2 dropped onto the first place → 2, 1, 3
  save = saved();
  await list.getByTestId(`order-${prefix}2`).dragTo(list.getByTestId(`order-${prefix}1`));
  await expect(list.locator("li").nth(0)).toHaveAttribute("data-testid", `order-${prefix}2`);
  await save;
  await page.reload();
  await expect(list.locator("li").nth(0)).toHaveAttribute("data-testid", `order-${prefix}2`);

  await list.getByRole("button", { name: `Edit ${prefix}1` }).click();
  const plate = page.getByRole("form", { name: "Nameplate" });
  await expect(plate.getByLabel(/Meter range/)).toBeVisible();
  await expect(plate.getByLabel(/Interrupting rating/)).toHaveCount(0);
  await plate.getByLabel(/Meter range/).fill("0–600 V");
  await plate.getByRole("button", { name: "Save nameplate" }).click();
  await expect(plate.getByRole("status")).toHaveText("Nameplate saved.");
  await expectNoSeriousA11yViolations(page, "board set-up");
});

test("the CSV import shows row-by-row errors before anything is written; the flood page passes the scan", async ({
  page,
}) => {
  test.setTimeout(90_000);
  await signIn(page, "curator");
  await page.waitForURL(/\/sites\/[^/]+/);
  const siteUrl = page.url().replace(/(\/sites\/[^/]+).*/, "$1");
  await page.goto(`${siteUrl}/inventory/import`);
  await page
    .getByLabel("…or paste the CSV")
    .fill(
      "board,designation,kind,grid_row,grid_col\nImport check board,IC-1,meter,1,1\nImport check board,IC-2,toaster,1,2\n",
    );
  await page.getByRole("button", { name: "Check the file" }).click();
  await expect(page.getByTestId("import-summary")).toContainText(
    "2 rows: 1 new, 0 changed, 0 unchanged, 1 with problems",
  );
  await expect(page.getByTestId("import-line-3")).toContainText("kind");
  await expect(page.getByRole("button", { name: /Apply/ })).toBeDisabled();
  await expectNoSeriousA11yViolations(page, "CSV import preview");
  const csv = await page.request.get(
    (await page.getByRole("link", { name: "Export the current inventory" }).getAttribute("href")) ?? "",
  );
  expect(csv.status()).toBe(200);
  expect(csv.headers()["content-type"]).toContain("text/csv");
  expect(await csv.text()).toContain("designation");

  await page.goto(`${siteUrl}/flood`);
  await expect(page.getByRole("heading", { level: 1, name: "Flood record" })).toBeVisible();
  await expect(page.getByLabel("Water", { exact: true }).first()).toBeVisible();
  await expectNoSeriousA11yViolations(page, "flood event page");
});

test("when someone else decides first, the curator sees their value and can apply theirs or re-apply their own", async ({
  page,
  baseURL,
}) => {
  const m = await makeBoard(baseURL!);
  const designation = `${m.prefix}3`;
  await signIn(page, "curator");
  await page.goto(`/sites/${m.siteId}/boards/${m.boardId}`);
  await page.getByTestId(`tile-${designation}`).click();
  const panel = page.getByTestId("position-panel");
  await expect(panel.getByTestId("recommendation")).toBeVisible();

  // a second curator decides "clean" behind this one's back
  const api = await curatorApi(baseURL!);
  const board = (await (await api.get(`/api/sites/${m.siteId}/boards/${m.boardId}`)).json()) as {
    positions: Array<{ designation: string; component: { id: string; version: number } }>;
  };
  const c = board.positions.find((p) => p.designation === designation)!.component;
  const put = await api.put(`/api/sites/${m.siteId}/components/${c.id}/disposition`, {
    data: { disposition: "clean", reason: "Second curator: dry and bright inside.", version: c.version },
  });
  expect(put.ok()).toBeTruthy();
  await api.dispose();

  const recommended = (await panel.getByTestId("recommendation").locator("strong").innerText()).trim();
  const choice = recommended === "Rebuild" ? "Replace" : "Rebuild";
  await panel.getByRole("radio", { name: new RegExp(`^${choice}`) }).check();
  await panel.getByLabel(/Why override/).fill("Original part: find a period spare.");
  await panel.getByRole("button", { name: "Save override" }).click();
  const notice = panel.getByTestId("conflict-notice");
  await expect(notice).toContainText("Someone else saved this");
  // In the form's own words: the disposition's label, a flag as yes / no.
  await expect(notice).toContainText("Disposition: — → Clean");
  await expect(notice).not.toContainText("false");
  await expect(panel.getByLabel(/Why override/)).toHaveValue("Original part: find a period spare.");
  await notice.getByRole("button", { name: "Apply mine again" }).click();
  await expect(panel.getByRole("status").filter({ hasText: "Saved." })).toBeVisible();
  await expect(page.getByTestId(`tile-${designation}`)).toContainText(choice.toLowerCase());
});

test("the set-up forms say what is wrong beside the field and keep the input; sections and positions add, rename and meet a stale edit", async ({
  page,
  baseURL,
}) => {
  const m = await makeBoard(baseURL!);
  await signIn(page, "curator");
  await page.goto(`/sites/${m.siteId}/boards/${m.boardId}/setup`);
  const board = page.getByRole("form", { name: "Board" });

  // The schema the server parses with answers in the browser; the server's own refusal sits beside its field.
  await board.getByLabel("Grid rows").fill("0");
  await board.getByRole("button", { name: "Save board" }).click();
  await expect(board.getByText("At least 1")).toBeVisible();
  await expect(board.getByLabel("Grid rows")).toHaveAttribute("aria-invalid", "true");
  await board.getByLabel("Grid rows").fill("2"); // the generated row is row 4
  await board.getByRole("button", { name: "Save board" }).click();
  await expect(board.getByText("A position reaches row 4; move it first")).toBeVisible();
  await expect(board.getByText("The grid would cut off positions.")).toBeVisible();
  await expect(board.getByLabel("Grid rows")).toHaveValue("2");

  const sections = page.getByRole("region", { name: "Sections" });
  await sections.getByLabel("New section").fill("Section A");
  await sections.getByRole("button", { name: "Add section" }).click();
  await expect(sections.getByLabel("Name of section “Section A”")).toHaveValue("Section A");
  await expect(sections.getByLabel("New section")).toHaveValue("");
  await sections.getByLabel("Name of section “Section A”").fill("Section A — lighting");
  await sections.getByLabel("Name of section “Section A”").press("Enter");
  await expect(sections.getByLabel("Name of section “Section A — lighting”")).toBeVisible();

  const add = page.getByRole("form", { name: "Add one position" });
  await add.getByRole("button", { name: "Add position" }).click();
  await expect(add.getByText("Give the designation painted on the board")).toBeVisible();
  await add.getByLabel("Designation").fill(`${m.prefix}9`);
  await add.getByLabel("Column", { exact: true }).fill("6");
  await add.getByRole("button", { name: "Add position" }).click();
  await expect(add.getByRole("status")).toHaveText("Saved.");
  await expect(add.getByLabel("Designation")).toHaveValue("");

  // Someone else changes position 1 while it is open here: both versions show, and mine can be applied again.
  const list = page.getByRole("region", { name: "Positions, in list order" });
  await list.getByRole("button", { name: `Edit ${m.prefix}1` }).click();
  const edit = page.getByRole("form", { name: `Position ${m.prefix}1` });
  await expect(edit.getByLabel("Circuit fed")).toBeVisible();
  const api = await curatorApi(baseURL!);
  const detail = (await (await api.get(`/api/sites/${m.siteId}/boards/${m.boardId}`)).json()) as {
    positions: Array<{ id: string; designation: string; version: number }>;
  };
  const p1 = detail.positions.find((p) => p.designation === `${m.prefix}1`)!;
  const theirs = await api.patch(`/api/sites/${m.siteId}/positions/${p1.id}`, {
    data: { circuit: "Galley lighting", version: p1.version },
  });
  expect(theirs.ok()).toBeTruthy();
  await api.dispose();
  await edit.getByLabel("Circuit fed").fill("Steering gear");
  await edit.getByRole("button", { name: "Save position" }).click();
  const notice = edit.getByTestId("conflict-notice");
  await expect(notice).toContainText("Galley lighting");
  await expect(edit.getByLabel("Circuit fed")).toHaveValue("Steering gear");
  await notice.getByRole("button", { name: "Apply mine again" }).click();
  await expect(edit.getByRole("status")).toHaveText("Saved.");
  await expect(notice).toHaveCount(0);
});
