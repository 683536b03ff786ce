import { afterAll, beforeAll, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startMailTestServer } from "../helpers/mail";
import type { Client } from "../helpers/http";
import { makeBoard } from "./defects-fixtures";

// The defect workflow's assign() and transition() hand their notices to the e-mail
// notifier once the change has committed; here through real SMTP to the fake server.
let t: TestDb;
let app: Awaited<ReturnType<typeof startMailTestServer>>;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let board: Awaited<ReturnType<typeof makeBoard>>;
const as: Record<string, Client> = {};

beforeAll(async () => {
  t = await createTestDb();
  app = await startMailTestServer(t.db);
  fx = await makeCrew(t.db);
  board = await makeBoard(t.db, fx.siteId);
  for (const role of ["curator", "volunteer"] as const) {
    as[role] = app.server.client();
    await as[role].signIn(fx.crew[role].email);
  }
});
afterAll(async () => {
  await app.close();
  await t.drop();
});

const url = (p = "") => `/api/sites/${fx.siteId}/defects${p}`;

it("when the curator assigns a defect, the assignee gets an e-mail naming it", async () => {
  const d = (
    await as.curator.post(url(), {
      boardId: board.boardId,
      title: "Seized operating handle",
      category: "mechanical",
      severity: "disabling",
    })
  ).body.defect;
  const r = await as.curator.post(url(`/${d.id}/assignee`), { assigneeId: fx.crew.volunteer.id, version: d.version });
  expect(r.status).toBe(200);
  const m = await app.smtp.mailbox.waitFor(
    (x) => x.to.includes(fx.crew.volunteer.email) && x.text.includes("Seized operating handle"),
  );
  expect(m.html).toBeTruthy();
});

it("when a volunteer's repair awaits verification, the curator is told; a switched-off curator is not", async () => {
  let d = (
    await as.volunteer.post(url(), {
      boardId: board.boardId,
      title: "Loose lug on phase B",
      category: "wiring",
      severity: "impaired",
    })
  ).body.defect;
  d = (await as.volunteer.post(url(`/${d.id}/status`), { to: "under_repair", version: d.version })).body.defect;
  d = (await as.volunteer.post(url(`/${d.id}/status`), { to: "awaiting_retest", version: d.version })).body.defect;
  expect(d.status).toBe("awaiting_retest");
  await app.smtp.mailbox.waitFor(
    (x) => x.to.includes(fx.crew.curator.email) && x.text.includes("Loose lug on phase B"),
  );

  await t.db
    .insertInto("notificationPrefs")
    .values({ userId: fx.crew.curator.id, key: "awaiting_verification", enabled: false })
    .execute();
  let e = (
    await as.volunteer.post(url(), {
      boardId: board.boardId,
      title: "Cracked arc chute",
      category: "mechanical",
      severity: "impaired",
    })
  ).body.defect;
  e = (await as.volunteer.post(url(`/${e.id}/status`), { to: "under_repair", version: e.version })).body.defect;
  e = (await as.volunteer.post(url(`/${e.id}/status`), { to: "awaiting_retest", version: e.version })).body.defect;
  expect(e.status).toBe("awaiting_retest");
  await new Promise((r) => setTimeout(r, 600));
  expect(app.smtp.mailbox.list().some((x) => x.text.includes("Cracked arc chute"))).toBe(false);
});
