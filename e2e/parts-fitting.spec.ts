import { expect, request, test } from "@playwright/test";
import { DEMO_PASSWORD, signIn } from "./support/auth";

/**
 * As the scrounger who fits parts from the wanted list: a line is known by a short
 * number a person can say (W-12), found by it however it is typed, and never by a hex id; fitting a whole
 * component proposes "period replacement" (not "heritage unchanged"), and the fitted part no longer counts
 * as original fabric. The board, its breaker and its "replace" decision are made through the API as the curator.
 */
async function replacedBreaker(baseURL: string) {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: { Origin: baseURL } });
  expect(
    (await api.post("/api/auth/sign-in", { data: { email: "curator@tideline.test", password: DEMO_PASSWORD } })).ok(),
  ).toBeTruthy();
  const siteId = ((await (await api.get("/api/sites")).json()) as { sites: Array<{ id: string }> }).sites[0].id;
  const prefix = `F${Date.now().toString(36).slice(-5).toUpperCase()}-`;
  const board = await api.post(`/api/sites/${siteId}/boards`, {
    data: { name: `Fitting board ${prefix}`, nominalVolts: 450, phases: 3, gridRows: 1, gridCols: 2 },
  });
  expect(board.status()).toBe(201);
  const boardId = ((await board.json()) as { id: string }).id;
  const gen = await api.post(`/api/sites/${siteId}/boards/${boardId}/positions/generate`, {
    data: { prefix, from: 1, to: 1, gridRow: 1, startCol: 1, kind: "molded_case_breaker" },
  });
  expect(gen.status()).toBe(201);
  const { positions } = (await gen.json()) as {
    positions: Array<{ position: { id: string }; component: { id: string; version: number } }>;
  };
  const comp = positions[0].component;
  const model = `KL-${prefix}100`; // invented model (fictional yard)
  const plate = await api.patch(`/api/sites/${siteId}/components/${comp.id}`, {
    data: { version: comp.version, maker: "Harrowgate Electric (fictional)", model, ratingAmps: 100, poles: 3 },
  });
  expect(plate.status(), await plate.text()).toBe(200);
  const { version } = (await plate.json()) as { version: number };
  const decided = await api.put(`/api/sites/${siteId}/components/${comp.id}/disposition`, {
    data: { disposition: "replace", reason: "Case cracked by the flood; a whole breaker is wanted", version },
  });
  expect(decided.status(), await decided.text()).toBe(200);
  const lines = (await (await api.get(`/api/sites/${siteId}/parts?status=all&q=${encodeURIComponent(model)}`)).json())
    .lines as Array<{ id: string; ref: string; number: number; need: string; heritageRule: string }>;
  expect(lines).toHaveLength(1);
  await api.dispose();
  return { siteId, boardId, designation: `${prefix}1`, positionId: positions[0].position.id, line: lines[0] };
}

test("the scrounger finds a line by its W-number, fits a whole breaker as a period replacement, and it stops counting as original fabric", async ({
  page,
  baseURL,
}) => {
  const { siteId, boardId, designation, line } = await replacedBreaker(baseURL!);
  expect(line.ref).toBe(`W-${line.number}`);
  expect(line.need).toBe(""); // a whole component, not a part of one
  // Counted in positions: on a site of thousands the rounded percentage may not move for one breaker.
  const originalFabric = async () =>
    ((await (await page.request.get(`/api/sites/${siteId}/overview`)).json()) as { originalRetained: number })
      .originalRetained;

  await signIn(page, "scrounger");
  const before = await originalFabric();

  // The wanted list: every line carries its W-number; no line is named by a hex id.
  await page.goto(`/sites/${siteId}/parts`);
  await expect(page.getByRole("heading", { level: 1, name: "Wanted parts" })).toBeVisible();
  const refs = page.getByTestId("line-ref");
  await expect(refs.first()).toBeVisible();
  for (const text of await refs.allInnerTexts()) expect(text.trim()).toMatch(/^W-\d+$/);
  const table = page.getByRole("table", { name: "Wanted parts" });
  expect(await table.innerText()).not.toMatch(/\b[0-9a-f]{8}\b/);

  // Typed as a person would say it on the phone: "w 12" without the dash finds exactly that line.
  const find = page.getByRole("searchbox", { name: "Find" });
  await find.fill(`w${line.number}`);
  await find.press("Enter");
  await expect(table).toHaveAttribute("aria-busy", "false");
  await expect(page.getByTestId("part-row")).toHaveCount(1);
  await expect(refs).toHaveText([line.ref]);
  await page.getByTestId("part-row").getByRole("link").first().click();
  await expect(page.getByText(`Line ${line.ref}`)).toBeVisible();
  expect(await page.locator("main").innerText()).not.toMatch(new RegExp(line.id.slice(0, 8)));

  // Acquired, received, then fitted: the form proposes what a whole component makes, and says why.
  const move = page.getByRole("form", { name: "Move this line on" });
  const status = move.getByLabel("New status");
  await status.selectOption({ label: "Acquired" });
  await move.getByLabel(/^Cost/).fill("85");
  await move.getByRole("button", { name: "Save status" }).click();
  await expect(move.getByText("Moved to acquired.")).toBeVisible();
  await status.selectOption({ label: "Received and inspected" });
  await move.getByRole("button", { name: "Save status" }).click();
  await expect(move.getByText("Moved to received and inspected.")).toBeVisible();
  await status.selectOption({ label: "Fitted" });
  await expect(move.getByRole("radio", { name: /^Period replacement/ })).toBeChecked();
  await expect(move.getByRole("radio", { name: /^Heritage unchanged/ })).not.toBeChecked();
  await expect(move.getByTestId("fitted-default-reason")).toHaveText(
    "This line sources a whole component: once fitted it no longer counts as original fabric.",
  );
  await page.screenshot({ path: ".data/test-results/parts-fitting-form.png", fullPage: true });
  await move.getByRole("button", { name: "Save status" }).click();
  // Fitted is the last step: the form goes, and the line's history says it.
  await expect(page.getByText(/Received and inspected → Fitted/)).toBeVisible();
  await expect(move).toHaveCount(0);

  // The position now says what is there, and the site's original-fabric figure went down.
  await page.goto(`/sites/${siteId}/boards/${boardId}`);
  await page.getByTestId(`tile-${designation}`).click();
  await expect(page.getByText("Period replacement").first()).toBeVisible();
  expect(await originalFabric()).toBe(before - 1);
});
