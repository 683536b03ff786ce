import { expect, request, test, type APIRequestContext, type BrowserContext, type Page } from "@playwright/test";
import sharp from "sharp";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { DEMO_PASSWORD, signIn } from "./support/auth";
import { expectKept, untilControlled } from "./support/offline";

/**
 * The field app with no signal. The browser context is set offline (Playwright's
 * network emulation, which the service worker sees too); the app is the production build that
 * playwright.config.ts serves, so its service worker precaches the shell. Each test makes its own
 * board through the API, so it does not depend on other tests.
 */
async function apiAs(baseURL: string, who: string): Promise<APIRequestContext> {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: { Origin: baseURL } });
  const r = await api.post("/api/auth/sign-in", { data: { email: `${who}@tideline.test`, password: DEMO_PASSWORD } });
  expect(r.ok()).toBeTruthy();
  return api;
}

async function makeBreaker(baseURL: string) {
  const api = await apiAs(baseURL, "curator");
  const siteId = ((await (await api.get("/api/sites")).json()) as { sites: Array<{ id: string }> }).sites[0].id;
  const prefix = `N${Date.now().toString(36).slice(-5).toUpperCase()}-`;
  const board = await api.post(`/api/sites/${siteId}/boards`, {
    data: { name: `Hull board ${prefix}`, gridRows: 2, gridCols: 4 },
  });
  const boardId = ((await board.json()) as { id: string }).id;
  const gen = await api.post(`/api/sites/${siteId}/boards/${boardId}/positions/generate`, {
    data: { prefix, from: 1, to: 1, gridRow: 1, startCol: 1, kind: "molded_case_breaker" },
  });
  expect(gen.status()).toBe(201);
  const positionId = ((await gen.json()) as { positions: Array<{ position: { id: string } }> }).positions[0].position
    .id;
  await api.dispose();
  return { siteId, boardId, positionId, designation: `${prefix}1` };
}

/** Opens the board and the position's quick log online, then waits until the service worker controls the page. */
async function visitOnline(page: Page, m: Awaited<ReturnType<typeof makeBreaker>>) {
  await page.goto(`/sites/${m.siteId}/boards/${m.boardId}`);
  await expect(page.getByRole("heading", { name: `Hull board ${m.designation.slice(0, -1)}` })).toBeVisible();
  // A whole new page load within a second of a read can lose it (the write is throttled): wait until it is kept.
  await expectKept(page, ["inventory", m.siteId, "board", m.boardId]);
  await page.goto(`/sites/${m.siteId}/log?position=${m.positionId}`);
  await expect(page.getByTestId("log-designation")).toHaveText(m.designation);
  await untilControlled(page);
  // The move tab's choices are read after that reload: read before it, they could be lost with it (the kept reads
  // are written at most once a second), and offline the tab then had no moves to offer.
  await expect(page.getByTestId("log-designation")).toHaveText(m.designation);
  await page.getByRole("tab", { name: "Move the part" }).click();
  await expect(page.getByTestId("custody-proposal")).toBeVisible();
  await page.getByRole("tab", { name: "Inspection" }).click();
  // Wait until this board, the position and its moves are on the phone.
  await expectKept(
    page,
    ["inventory", m.siteId, "board", m.boardId],
    ["inventory", m.siteId, "position", m.positionId],
    ["inventory", m.siteId, "custody-options"],
  );
}

const shot = () =>
  sharp({ create: { width: 320, height: 240, channels: 3, background: "#4d6a5e" } })
    .jpeg()
    .toBuffer();

async function goOffline(context: BrowserContext, page: Page) {
  await context.setOffline(true);
  await expect(page.getByTestId("connection")).toHaveText(/Offline/);
}

test.describe("with no signal, on a 360 px phone", () => {
  test.setTimeout(180_000);
  test.use({ viewport: { width: 360, height: 740 } });

  test("logs inspections, a move and a photo offline, survives a reload and a closed page, then syncs each once", async ({
    page,
    context,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    await signIn(page, "volunteer");
    await visitOnline(page, m);

    await goOffline(context, page);
    await page.reload(); // the app still opens: the service worker serves the shell, the cache the data
    await expect(page.getByTestId("log-designation")).toHaveText(m.designation);
    await expect(page.getByTestId("offline-marker")).toContainText("showing what was last synced at");

    for (const [n, pct] of ["1", "3", "10"].entries()) {
      await page.getByLabel("Surface rusted (%)").fill(pct);
      await page.getByRole("button", { name: "Save inspection" }).click();
      await expect(page.getByTestId("waiting-count")).toHaveText(`${n + 1} waiting to send`);
      await expect(page.getByTestId("logged-pending")).toContainText("Inspection kept on this phone");
      await expect(page.getByLabel("Surface rusted (%)")).toHaveValue(""); // a fresh form for the next one
    }
    await expect(page.getByTestId("waiting-count")).toHaveText("3 waiting to send");

    await page.getByRole("tab", { name: "Move the part" }).click();
    await page.getByLabel("Tag number on the bag").fill(`TG-${m.designation}`);
    await page.getByLabel("Where is it now?").fill("Crate C, shaft tunnel");
    await page.getByRole("button", { name: "Save move: Removed (tagged)" }).click();
    await expect(page.getByTestId("logged-pending")).toContainText("Move kept on this phone");
    await page
      .getByRole("region", { name: "Photos of this move" })
      .locator("input[type=file]")
      .setInputFiles({ name: "bagged-offline.jpg", mimeType: "image/jpeg", buffer: await shot() });
    await expect(page.getByTestId("photo-pending")).toContainText("bagged-offline.jpg");
    await expect(page.getByTestId("waiting-count")).toHaveText("5 waiting to send");
    await page.screenshot({ path: ".data/test-results/offline-pending.png" });
    // Signing out with changes waiting asks first; the person stays.
    await page.getByRole("button", { name: "Sign out" }).click();
    await expect(page.getByRole("alertdialog")).toContainText(
      "5 changes on this phone have not reached the server yet",
    );
    await page.getByRole("button", { name: "Stay signed in" }).click();
    await expect(page.getByRole("alertdialog")).toHaveCount(0);
    await expectNoSeriousA11yViolations(page, "quick log offline with changes waiting");
    // Typed search needs the server: with no signal the finder says so, and points at the board list.
    await page.goto(`/sites/${m.siteId}/log`);
    await page.getByLabel("Designation or tag number").fill("ZZ-404");
    await expect(page.getByTestId("finder-offline")).toContainText("Pick the board below");

    // Closing the page mid-queue loses nothing: a new page (still offline) shows the same five.
    const again = await context.newPage();
    await page.close();
    await again.goto(`/sites/${m.siteId}/log?position=${m.positionId}`);
    await expect(again.getByTestId("waiting-count")).toHaveText("5 waiting to send");

    // Back in range: while the photo goes up, the bar says how far it is (the upload is held here until seen).
    let letThrough!: () => void;
    const held = new Promise<void>((resolve) => (letThrough = resolve));
    await again.route("**/api/sites/*/photos", async (route) => {
      if (route.request().method() === "POST") await held;
      await route.continue();
    });
    const backInRange = Date.now();
    await context.setOffline(false);
    await again.evaluate(() => window.dispatchEvent(new Event("online")));
    await expect(again.getByTestId("photo-progress")).toContainText("Sending photos: 0 of 1", { timeout: 30_000 });
    await expect(again.getByRole("progressbar", { name: "Photo upload progress" })).toBeVisible();
    letThrough();
    await expect(again.getByTestId("waiting-count")).toHaveText("nothing waiting", { timeout: 30_000 });
    await expect(again.getByTestId("photo-progress")).toHaveCount(0);

    // Through the API: each exists exactly once.
    const api = await apiAs(baseURL!, "volunteer");
    const d = (await (await api.get(`/api/sites/${m.siteId}/positions/${m.positionId}`)).json()) as {
      inspections: Array<{ percentRusted: number; inspectedAt: string }>;
      custodyMoves: Array<{ id: string; toState: string; location: string }>;
    };
    expect(d.inspections.map((i) => i.percentRusted).sort((a, b) => a - b)).toEqual([1, 3, 10]);
    // Each keeps when it was made on the phone, not when the signal came back.
    for (const i of d.inspections) expect(Date.parse(i.inspectedAt)).toBeLessThan(backInRange);
    expect(d.custodyMoves.filter((c) => c.toState === "removed")).toHaveLength(1);
    const moveId = d.custodyMoves.find((c) => c.toState === "removed")!.id;
    const photos = (await (await api.get(`/api/sites/${m.siteId}/photos?custodyMoveId=${moveId}`)).json()) as {
      photos: Array<{ originalName?: string }>;
    };
    expect(photos.photos).toHaveLength(1);
    await api.dispose();
  });

  test("a part whose moves were never read with signal still offers them offline, worked out on the phone", async ({
    page,
    context,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    await signIn(page, "volunteer");
    await page.goto(`/sites/${m.siteId}/log?position=${m.positionId}`);
    await expect(page.getByTestId("log-designation")).toHaveText(m.designation);
    await untilControlled(page);
    await expectKept(page, ["inventory", m.siteId, "position", m.positionId]);
    await goOffline(context, page);
    await page.getByRole("tab", { name: "Move the part" }).click();
    await expect(page.getByTestId("custody-on-phone")).toContainText("worked out on this phone");
    await page.getByLabel("Tag number on the bag").fill(`TP-${m.designation}`);
    await page.getByRole("button", { name: "Save move: Removed (tagged)" }).click();
    await expect(page.getByTestId("logged-pending")).toContainText("Move kept on this phone");
    await context.setOffline(false);
    await page.evaluate(() => window.dispatchEvent(new Event("online")));
    await expect(page.getByTestId("waiting-count")).toHaveText("nothing waiting", { timeout: 30_000 });
  });

  test("a move made offline that meets a newer one comes back side by side; the person keeps the server's", async ({
    page,
    context,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    await signIn(page, "volunteer");
    await visitOnline(page, m);
    await goOffline(context, page);
    await page.getByRole("tab", { name: "Move the part" }).click();
    await page.getByLabel("Tag number on the bag").fill(`TV-${m.designation}`);
    await page.getByLabel("Where is it now?").fill("Bench 1");
    await page.getByRole("button", { name: "Save move: Removed (tagged)" }).click();
    await expect(page.getByTestId("waiting-count")).toHaveText("1 waiting to send");

    // Meanwhile the curator, with signal, moves the same part.
    const curator = await apiAs(baseURL!, "curator");
    const pos = (await (await curator.get(`/api/sites/${m.siteId}/positions/${m.positionId}`)).json()) as {
      component: { id: string; version: number };
    };
    const moved = await curator.post(`/api/sites/${m.siteId}/components/${pos.component.id}/custody`, {
      data: {
        toState: "removed",
        tagNumber: `TC-${m.designation}`,
        location: "Curator's crate",
        version: pos.component.version,
      },
    });
    expect(moved.status()).toBe(201);

    await context.setOffline(false);
    await page.evaluate(() => window.dispatchEvent(new Event("online")));
    await expect(page.getByTestId("outbox-attention")).toBeVisible({ timeout: 30_000 });
    await page.getByTestId("outbox-attention").click();
    const item = page.getByTestId("outbox-conflict").or(page.getByTestId("outbox-refused"));
    await expect(item).toBeVisible();
    await page.screenshot({ path: ".data/test-results/offline-conflict.png" });
    await item.getByRole("button", { name: /Keep the server's|Discard/ }).click();
    await expect(page.getByTestId("outbox-attention")).toHaveCount(0);
    const after = (await (await curator.get(`/api/sites/${m.siteId}/positions/${m.positionId}`)).json()) as {
      custodyMoves: Array<{ location: string }>;
    };
    expect(after.custodyMoves.map((c) => c.location)).toEqual(["Curator's crate"]);
    await curator.dispose();
  });
});

test.describe("readings, a watch check and a defect with no signal, on a 360 px phone", () => {
  test.setTimeout(240_000);
  test.use({ viewport: { width: 360, height: 740 } });

  // Was a fixme (lead's fresh-clone run of 624d220): the readings page opened offline said "Not kept on this
  // phone yet". Cause: the kept reads are written at most once a second, and each page here was left (a full
  // load) within that second of its last read, so the board's readings were never written; the restore-time
  // refetch of 44c0b00 made that second busier. The app now also writes them when the page is hidden or left,
  // and this test waits until each page's reads are kept before moving on (support/offline.ts).
  test("readings, a step test, a hunt step, a watch check and a defect wait on the phone, go in order when the signal returns, each exactly once", async ({
    page,
    context,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    const api = await apiAs(baseURL!, "volunteer");
    // The demo's main switchboard has a stage live under watch (server/seed/return-to-service.ts).
    const overview = (await (await api.get(`/api/sites/${m.siteId}/return-to-service`)).json()) as {
      boards: Array<{ boardId: string; boardName: string }>;
    };
    const mainId = overview.boards.find((b) => b.boardName === "Main switchboard (engine room, aft)")!.boardId;
    const tag = m.designation;
    const circuit = `Offline feeder ${tag}`;
    const note = `Offline watch ${tag}`;
    const title = `Offline verdigris ${tag}`;
    const raiseUrl = `/sites/${m.siteId}/defects/new?boardId=${m.boardId}&category=corrosion&severity=degraded`;

    await signIn(page, "volunteer");
    await visitOnline(page, m);
    // Open each page once with signal so the phone keeps what it shows.
    await page.goto(`/sites/${m.siteId}/readings/boards/${m.boardId}`);
    await expect(page.getByRole("form", { name: "Record an insulation-resistance reading" })).toBeVisible();
    await expectKept(page, ["readings", m.siteId, "board", m.boardId]);
    await page.goto(`/sites/${m.siteId}/boards/${mainId}/watch`);
    await expect(page.getByRole("button", { name: "Save the check" })).toBeVisible();
    await expectKept(page, ["rts", m.siteId, "board", mainId]);
    await page.goto(raiseUrl);
    await expect(page.getByLabel("What is wrong")).toBeVisible();
    await expectKept(page, ["defects", m.siteId, "options"], ["defects", m.siteId, "positions", m.boardId]);

    await goOffline(context, page);
    await page.goto(`/sites/${m.siteId}/readings/boards/${m.boardId}`);
    const form = page.getByRole("form", { name: "Record an insulation-resistance reading" });
    await form.getByLabel("Component").selectOption({ label: "No component: name the circuit" });
    await form.getByLabel("Circuit", { exact: true }).fill(circuit);
    await form.getByLabel("Reading (MΩ)").fill("85");
    await form.getByLabel("Equipment temperature (°C)").fill("18");
    await form.getByRole("button", { name: "Save reading" }).click();
    await expect(page.getByTestId("reading-pending")).toContainText("Reading kept on this phone");
    await expect(page.getByTestId("waiting-count")).toHaveText("1 waiting to send");

    // A step-voltage test and a ground-hunt step wait on the phone the same way.
    await page.getByRole("button", { name: "Step voltage", exact: true }).click();
    const step = page.getByRole("form", { name: "Record a step-voltage test" });
    await step.getByLabel("Component").selectOption({ label: "No component: name the circuit" });
    await step.getByLabel("Circuit", { exact: true }).fill(`${circuit} steps`);
    for (const [i, mo] of ["900", "880", "860"].entries()) await step.getByLabel(`Step ${i + 1} reading (MΩ)`).fill(mo);
    await step.getByRole("button", { name: "Save step test" }).click();
    await expect(page.getByTestId("reading-pending")).toContainText("Step-voltage test kept on this phone");
    await expect(page.getByTestId("waiting-count")).toHaveText("2 waiting to send");
    await page.getByRole("button", { name: "Ground hunt", exact: true }).click();
    const hunt = page.getByRole("form", { name: "Log a ground-hunt step" });
    await hunt.getByLabel("Hunt", { exact: true }).fill(`Offline hunt ${tag}`);
    await hunt.getByRole("button", { name: "Save this step" }).click();
    await expect(page.getByTestId("reading-pending")).toContainText("1 step of this hunt kept on this phone");
    await expect(page.getByTestId("waiting-count")).toHaveText("3 waiting to send");
    await page.screenshot({ path: ".data/test-results/offline-hunt-pending.png" });

    await page.goto(`/sites/${m.siteId}/boards/${mainId}/watch`);
    await page.getByRole("button", { name: "All three equal" }).click();
    await page.getByLabel("Note").fill(note);
    await page.getByRole("button", { name: "Save the check" }).click();
    await expect(page.getByTestId("watch-pending")).toContainText("Kept on this phone");
    await expect(page.getByTestId("waiting-count")).toHaveText("4 waiting to send");

    await page.goto(raiseUrl);
    await page.getByLabel("What is wrong").fill(title);
    await page.getByRole("button", { name: "Raise the defect" }).click();
    await expect(page.getByTestId("defect-pending")).toContainText(title);
    await page
      .getByRole("region", { name: "Photos of this defect" })
      .locator("input[type=file]")
      .setInputFiles({ name: "verdigris-offline.jpg", mimeType: "image/jpeg", buffer: await shot() });
    await expect(page.getByTestId("photo-pending")).toContainText("verdigris-offline.jpg");
    await expect(page.getByTestId("waiting-count")).toHaveText("6 waiting to send");
    await page.screenshot({ path: ".data/test-results/offline-defect-pending.png" });
    // A board whose positions the phone never kept: the position list says why it offers only the board.
    await page.goto(`/sites/${m.siteId}/defects/new?boardId=${mainId}`);
    await expect(page.getByText("this board's positions are not kept on this phone yet")).toBeVisible();

    await context.setOffline(false);
    await page.evaluate(() => window.dispatchEvent(new Event("online")));
    await expect(page.getByTestId("waiting-count")).toHaveText("nothing waiting", { timeout: 60_000 });

    const readings = (await (await api.get(`/api/sites/${m.siteId}/boards/${m.boardId}/readings`)).json()) as {
      insulation: Array<{ circuit: string }>;
      stepTests: Array<{ circuit: string }>;
      groundHunts: Array<{ hunt: string; steps: unknown[] }>;
    };
    expect(readings.insulation.filter((r) => r.circuit === circuit)).toHaveLength(1);
    expect(readings.stepTests.filter((r) => r.circuit === `${circuit} steps`)).toHaveLength(1);
    expect(readings.groundHunts.find((h) => h.hunt === `Offline hunt ${tag}`)?.steps).toHaveLength(1);
    const rts = (await (await api.get(`/api/sites/${m.siteId}/boards/${mainId}/return-to-service`)).json()) as {
      events: Array<{ kind: string; detail: string }>;
    };
    expect(rts.events.filter((e) => e.kind === "watch_check" && e.detail.includes(note))).toHaveLength(1);
    const defects = (await (await api.get(`/api/sites/${m.siteId}/defects?q=${encodeURIComponent(title)}`)).json()) as {
      rows: Array<{ id: string; title: string }>;
    };
    const rows = defects.rows.filter((d) => d.title === title);
    expect(rows).toHaveLength(1);
    const photos = (await (await api.get(`/api/sites/${m.siteId}/photos?defectId=${rows[0].id}`)).json()) as {
      photos: unknown[];
    };
    expect(photos.photos).toHaveLength(1);
    await api.dispose();
  });
});

test.describe("every field page opened with signal opens with none, on a 360 px phone", () => {
  test.setTimeout(240_000);
  test.use({ viewport: { width: 360, height: 740 } });

  test("boards, a board, a position, readings, the watch log and defects show what was kept", async ({
    page,
    context,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    const api = await apiAs(baseURL!, "volunteer");
    const s = m.siteId;
    const overview = (await (await api.get(`/api/sites/${s}/return-to-service`)).json()) as {
      boards: Array<{ boardId: string; boardName: string }>;
    };
    const mainId = overview.boards.find((b) => b.boardName === "Main switchboard (engine room, aft)")!.boardId;
    const defect = (await (await api.get(`/api/sites/${s}/defects`)).json()) as {
      rows: Array<{ id: string; title: string }>;
    };
    const { id: defectId, title: defectTitle } = defect.rows[0];
    await api.dispose();

    // Each page: where it is, what shows it opened with its data, and the reads it keeps.
    const pages: Array<{ url: string; shows: (p: Page) => ReturnType<Page["getByRole"]>; keeps: unknown[][] }> = [
      {
        url: `/sites/${s}/boards`,
        shows: (p) => p.getByRole("link", { name: new RegExp(`Hull board ${m.designation.slice(0, -1)}`) }),
        keeps: [["inventory", s, "boards"]],
      },
      {
        url: `/sites/${s}/boards/${m.boardId}`,
        shows: (p) => p.getByRole("heading", { name: `Hull board ${m.designation.slice(0, -1)}` }),
        keeps: [["inventory", s, "board", m.boardId]],
      },
      {
        url: `/sites/${s}/log?position=${m.positionId}`,
        shows: (p) => p.getByTestId("log-designation"),
        keeps: [["inventory", s, "position", m.positionId]],
      },
      {
        url: `/sites/${s}/readings/boards/${m.boardId}`,
        shows: (p) => p.getByRole("form", { name: "Record an insulation-resistance reading" }),
        keeps: [["readings", s, "board", m.boardId]],
      },
      {
        url: `/sites/${s}/boards/${mainId}/watch`,
        shows: (p) => p.getByRole("button", { name: "Save the check" }),
        keeps: [["rts", s, "board", mainId]],
      },
      {
        url: `/sites/${s}/defects`,
        shows: (p) => p.getByRole("heading", { name: "Defect register" }),
        keeps: [["defects", s, "list"]],
      },
      {
        url: `/sites/${s}/defects/${defectId}`,
        shows: (p) => p.getByRole("heading", { name: defectTitle }),
        keeps: [["defects", s, "detail", defectId]],
      },
    ];

    await signIn(page, "volunteer");
    await visitOnline(page, m);
    for (const p of pages) {
      await page.goto(p.url);
      await expect(p.shows(page).first()).toBeVisible();
      await expectKept(page, ...p.keeps);
    }

    await goOffline(context, page);
    for (const p of pages) {
      await page.goto(p.url); // a whole new load with no network: the shell from the worker, the data from the phone
      await expect(p.shows(page).first(), p.url).toBeVisible();
      await expect(page.getByTestId("offline-marker")).toContainText("showing what was last synced at");
      await expect(page.getByRole("main").getByTestId("not-on-phone")).toHaveCount(0);
    }
    await page.goto(`/sites/${s}/readings/boards/${m.boardId}`);
    await page.screenshot({ path: ".data/test-results/offline-readings-kept.png", fullPage: false });
  });
});

test.describe("a refresh that gets no answer, on a 360 px phone", () => {
  test.setTimeout(120_000);
  // The worker is kept out so that the routes below see every /api request (the page's own fetches).
  test.use({ viewport: { width: 360, height: 740 }, serviceWorkers: "block" });

  test("a board and the register keep showing what the phone has, marked with its time, not an error panel", async ({
    page,
    context,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    await signIn(page, "volunteer");
    const boardHeading = page.getByRole("heading", { name: `Hull board ${m.designation.slice(0, -1)}` });
    await page.goto(`/sites/${m.siteId}/defects`);
    await expect(page.getByRole("heading", { name: "Defect register" })).toBeVisible();
    await expectKept(page, ["defects", m.siteId, "list"]);
    await page.goto(`/sites/${m.siteId}/boards/${m.boardId}`);
    await expect(boardHeading).toBeVisible();
    await expectKept(page, ["inventory", m.siteId, "board", m.boardId]);

    // A dead Wi-Fi: the server's health answers, the site's reads get no answer at all.
    await context.route(/\/api\/sites\//, (r) => r.abort("internetdisconnected"));
    await page.reload();
    await expect(page.getByTestId("stale-marker")).toContainText("Could not refresh: showing what was last synced at", {
      timeout: 30_000,
    });
    await expect(boardHeading).toBeVisible();
    await expect(page.getByRole("main").getByRole("alert")).toHaveCount(0);
    await page.screenshot({ path: ".data/test-results/refresh-failed-board.png" });

    await page.goto(`/sites/${m.siteId}/defects`);
    await expect(page.getByTestId("stale-marker")).toBeVisible({ timeout: 30_000 });
    await expect(page.getByRole("heading", { name: "Defect register" })).toBeVisible();
    await expect(page.getByRole("main").getByRole("alert")).toHaveCount(0);

    // The signal is back: "Try again" refreshes and the marker goes.
    await context.unrouteAll();
    await page.getByTestId("stale-marker").getByRole("button", { name: "Try again" }).click();
    await expect(page.getByTestId("stale-marker")).toHaveCount(0, { timeout: 30_000 });
  });
});

test.describe("editing a defect with no signal, on a 360 px phone", () => {
  test.setTimeout(180_000);
  test.use({ viewport: { width: 360, height: 740 } });

  test("an edit waits on the phone; meeting the curator's change it is compared field by field and the person's choice is saved", async ({
    page,
    context,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    const vol = await apiAs(baseURL!, "volunteer");
    const raised = await vol.post(`/api/sites/${m.siteId}/defects`, {
      data: {
        boardId: m.boardId,
        title: `Lug scorched ${m.designation}`,
        category: "mechanical",
        severity: "impaired",
      },
    });
    expect(raised.status()).toBe(201);
    const { id } = ((await raised.json()) as { defect: { id: string } }).defect;

    await signIn(page, "volunteer");
    await page.goto(`/sites/${m.siteId}/defects/${id}`);
    await expect(page.getByRole("heading", { name: `Lug scorched ${m.designation}` })).toBeVisible();
    await expectKept(page, ["defects", m.siteId, "detail", id]);

    await goOffline(context, page);
    await page.getByRole("button", { name: "Edit the details" }).click();
    await page.getByLabel("What is wrong").fill(`Lug scorched and cracked ${m.designation}`);
    await page.getByRole("button", { name: "Save" }).click();
    await expect(page.getByTestId("edit-pending")).toContainText("Edit kept on this phone");
    await expect(page.getByTestId("waiting-count")).toHaveText("1 waiting to send");
    // The page shows the person's value, marked as waiting, not the server's older one.
    await expect(page.getByRole("heading", { name: `Lug scorched and cracked ${m.designation}` })).toBeVisible();
    await expect(page.getByRole("heading", { level: 1 }).getByTestId("pending-mark")).toHaveText("◷ waiting to send");
    await expect(page.getByTestId("defect-pending-banner")).toContainText("not on the server yet");
    await page.screenshot({ path: ".data/test-results/offline-edit-pending.png" });

    // Meanwhile the curator, with signal, raises its severity.
    const curator = await apiAs(baseURL!, "curator");
    const now = (await (await curator.get(`/api/sites/${m.siteId}/defects/${id}`)).json()) as {
      defect: { version: number };
    };
    const theirs = await curator.patch(`/api/sites/${m.siteId}/defects/${id}`, {
      data: { severity: "disabling", version: now.defect.version },
    });
    expect(theirs.status()).toBe(200);

    await context.setOffline(false);
    await page.evaluate(() => window.dispatchEvent(new Event("online")));
    await expect(page.getByTestId("outbox-attention")).toBeVisible({ timeout: 30_000 });
    await page.getByTestId("outbox-attention").click();
    const item = page.getByTestId("outbox-conflict");
    await expect(item.getByTestId("conflict-title")).toContainText("What is wrong");
    await expect(item.getByTestId("conflict-title")).toContainText(`Lug scorched and cracked ${m.designation}`);
    // Values read as the form says them, not as stored.
    await expect(item.getByTestId("conflict-severity")).toContainText("3 · Impaired");
    await expect(item.getByTestId("conflict-severity")).toContainText("4 · Disabling");
    await expect(item.getByTestId("conflict-partsState")).toContainText("No parts needed");
    await expect(item).not.toContainText("none_needed");
    await expect(item).not.toContainText("blocksEnergisation");
    await page.screenshot({ path: ".data/test-results/offline-edit-conflict.png" });
    await item.getByLabel("Severity: keep the server's").check();
    await item.getByRole("button", { name: "Send my choices" }).click();
    await expect(page.getByTestId("outbox-attention")).toHaveCount(0, { timeout: 30_000 });
    await expect(page.getByTestId("waiting-count")).toHaveText("nothing waiting", { timeout: 30_000 });

    const after = (await (await curator.get(`/api/sites/${m.siteId}/defects/${id}`)).json()) as {
      defect: { title: string; severity: string };
    };
    expect(after.defect).toMatchObject({ title: `Lug scorched and cracked ${m.designation}`, severity: "disabling" });
    // Sent: the page shows the server's record again, nothing marked as waiting.
    await expect(page.getByTestId("defect-pending-banner")).toHaveCount(0);
    await expect(page.getByTestId("pending-mark")).toHaveCount(0);
    await vol.dispose();
    await curator.dispose();
  });
});

test.describe("code a phone never got, on a 360 px phone", () => {
  test.setTimeout(120_000);
  // No service worker: the page's chunks come from the server alone, as in the seconds before a first visit's worker
  // has kept them. The routes below fail the chunks of what the page shows only later.
  test.use({ viewport: { width: 360, height: 740 }, serviceWorkers: "block" });

  test("a position's panel whose code never arrived says so in its place and opens when the signal returns", async ({
    page,
    context,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    await signIn(page, "volunteer");
    const later = /\/assets\/(position-panel|position-photos|breaker-operations)-[^/]*\.js$/;
    await context.route(later, (r) => r.abort("internetdisconnected"));
    await page.goto(`/sites/${m.siteId}/boards/${m.boardId}`);
    const boardHeading = page.getByRole("heading", { name: `Hull board ${m.designation.slice(0, -1)}` });
    await expect(boardHeading).toBeVisible();

    await context.setOffline(true);
    await page.getByTestId(`tile-${m.designation}`).click();
    const notLoaded = page.getByTestId("part-not-loaded");
    await expect(notLoaded).toContainText("This position's panel is not kept on this phone yet");
    await expect(boardHeading).toBeVisible(); // the page stays, not the route's error page
    await expect(page.getByRole("heading", { name: /failed to load/ })).toHaveCount(0);
    await page.screenshot({ path: ".data/test-results/part-not-loaded-phone.png" });
    await page.setViewportSize({ width: 1280, height: 800 }); // the panel is a side drawer on a wide screen
    await expect(notLoaded).toBeVisible();
    await page.screenshot({ path: ".data/test-results/part-not-loaded-wide.png" });
    await page.setViewportSize({ width: 360, height: 740 });
    // It closes like the panel.
    await page.getByRole("button", { name: "Close the position panel" }).click();
    await expect(notLoaded).toHaveCount(0);
    await page.getByTestId(`tile-${m.designation}`).click();
    await expect(notLoaded).toBeVisible();

    // The signal returns: the panel opens by itself.
    await context.unroute(later);
    await context.setOffline(false);
    await expect(page.getByTestId("position-panel")).toBeVisible({ timeout: 30_000 });
    await expect(page.getByTestId("position-panel").getByRole("heading", { name: m.designation })).toBeVisible();
    await expect(notLoaded).toHaveCount(0);
  });

  test("a page whose code never arrived says it is not on the phone yet, without a reload button, then opens", async ({
    page,
    context,
    baseURL,
  }) => {
    const m = await makeBreaker(baseURL!);
    await signIn(page, "volunteer");
    const readings = /\/assets\/board-readings-[^/]*\.js$/;
    await context.route(readings, (r) => r.abort("internetdisconnected"));
    await page.goto(`/sites/${m.siteId}/boards/${m.boardId}`);
    await expect(page.getByRole("heading", { name: `Hull board ${m.designation.slice(0, -1)}` })).toBeVisible();

    await context.setOffline(true);
    await page.getByRole("link", { name: "Test readings of this board" }).click();
    await expect(page.getByRole("heading", { name: "Not kept on this phone yet" })).toBeVisible();
    await expect(page.getByText("it opens when the connection returns")).toBeVisible();
    await expect(page.getByRole("button", { name: "Reload" })).toHaveCount(0);
    // In the page's place: the sync bar (what waits on the phone) and the site's navigation stay.
    await expect(page.getByTestId("site-name")).toBeVisible();
    await expect(page.getByRole("navigation", { name: "Site (phone)" })).toBeVisible();
    await expect(page.getByRole("main")).toHaveCount(1);
    await page.screenshot({ path: ".data/test-results/page-not-loaded-phone.png" });

    await context.unroute(readings);
    await context.setOffline(false);
    await expect(page.getByRole("heading", { name: "Not kept on this phone yet" })).toHaveCount(0, { timeout: 30_000 });
    await expect(page).toHaveURL(new RegExp(`/readings/boards/${m.boardId}`));
    await expect(page.getByRole("main").getByRole("heading").first()).toBeVisible();
  });
});
