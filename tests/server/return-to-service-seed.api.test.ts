import { afterAll, beforeAll, expect, it } from "vitest";
import { seedDemo } from "../../server/seed/demo";
import { boardView } from "../../server/return-to-service/view";
import { createTestDb, type TestDb } from "../helpers/db";

let t: TestDb;
let v: Awaited<ReturnType<typeof boardView>>;
beforeAll(async () => {
  t = await createTestDb();
  await seedDemo(t.db);
  const siteId = (await t.db.selectFrom("sites").select("id").executeTakeFirstOrThrow()).id;
  const boardId = (
    await t.db
      .selectFrom("boards")
      .select("id")
      .where("name", "=", "Main switchboard (engine room, aft)")
      .executeTakeFirstOrThrow()
  ).id;
  v = await boardView(t.db, siteId, boardId, new Date());
});
afterAll(async () => t.drop());

it("the demo main board: bus-tie stage released after a week under watch, in its second attempt", () => {
  const [s1] = v.stages;
  expect(s1.name).toContain("bus tie");
  expect(s1.status).toBe("released");
  expect(s1.attempt).toBe(2);
  expect(s1.watchHours).toBe(168);
  expect(s1.gate.state).toBe("released");
});

it("the first feeders were energised today at full voltage from the temporary feed, watch in progress", () => {
  const s2 = v.stages[1];
  expect(s2).toMatchObject({ status: "energised", voltageStep: "full", supply: "temporary_fused" });
  expect(s2.energisedAt!.slice(0, 10)).toBe(new Date().toISOString().slice(0, 10));
  expect(s2.watch!.complete).toBe(false);
  expect(s2.gate.state).toBe("live");
  expect(s2.gate.releasedWithReason).toHaveLength(1);
});

it("the next stage is blocked by exactly two named reasons, each with a link", () => {
  const s3 = v.stages[2];
  expect(s3.gate.state).toBe("blocked");
  expect(s3.gate.blockers).toHaveLength(2);
  for (const b of s3.gate.blockers) expect(b.href).toMatch(/^\/sites\//);
});

it("an earlier day's incident (a blown fuse) opened a defect, and the log shows it", () => {
  const incident = v.events.find((e) => e.kind === "incident")!;
  expect(incident.title).toContain("Protection operated");
  expect(incident.defectId).toBeTruthy();
  expect(Date.parse(incident.at)).toBeLessThan(Date.now() - 86_400_000);
});

it("the demo's watch checks reached the server as they were made (none reads 'kept on the phone')", async () => {
  const rows = await t.db.selectFrom("rtsWatchChecks").select(["at", "createdAt"]).execute();
  expect(rows.length).toBeGreaterThan(10);
  for (const r of rows) expect(r.createdAt.getTime() - r.at.getTime()).toBeLessThan(10 * 60_000);
});
