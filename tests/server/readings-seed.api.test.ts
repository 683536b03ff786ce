import { afterAll, beforeAll, expect, it } from "vitest";
import { seedDemo } from "../../server/seed/demo";
import * as reads from "../../server/readings/reads";
import { createTestDb, type TestDb } from "../helpers/db";
import { icuMinute } from "../helpers/icu";

let t: TestDb;
let siteId: string;
let boardId: string;
beforeAll(async () => {
  t = await createTestDb();
  await seedDemo(t.db);
  siteId = (await t.db.selectFrom("sites").select("id").executeTakeFirstOrThrow()).id;
  boardId = (
    await t.db
      .selectFrom("boards")
      .select("id")
      .where("name", "=", "Main switchboard (engine room, aft)")
      .executeTakeFirstOrThrow()
  ).id;
});
afterAll(async () => t.drop());

it("the demo dry-out has three circuits megged on ten days at varied temperatures, corrected values rising", async () => {
  const { insulation } = await reads.boardReadings(t.db, siteId, boardId);
  const byComponent = new Map<string | null, typeof insulation>();
  // The dry-out series (the return-to-service demo adds readings on other circuits).
  for (const r of insulation.filter((x) => ["1-1", "1-2", "BUS-A"].includes(x.designation ?? "")))
    byComponent.set(r.componentId, [...(byComponent.get(r.componentId) ?? []), r]);
  expect(byComponent.size).toBe(3);
  for (const series of byComponent.values()) {
    expect(series).toHaveLength(10);
    expect(new Set(series.map((r) => r.equipmentTempC)).size).toBeGreaterThan(5);
    const oldestFirst = [...series].reverse().map((r) => r.judgement.correctedMegohms!);
    expect(oldestFirst.at(-1)!).toBeGreaterThan(oldestFirst[0] * 5);
  }
  const verdicts = new Set(insulation.map((r) => r.judgement.verdict));
  expect(verdicts).toContain("below_minimum");
  expect(verdicts).toContain("meets");
});

it("the demo has one outlier pole, a level-2 thermal finding and a dim phase-B lamp", async () => {
  const { contacts, thermal, groundChecks } = await reads.boardReadings(t.db, siteId, boardId);
  expect(contacts.filter((c) => c.judgement.outliers.length > 0).map((c) => c.designation)).toEqual(["G1"]);
  // 6.5 °C over a similar lug at 65 % load is level 2 as measured; scaled to rated load
  // (× (100/65)² = 15.4 °C) it is level 4 (NETA Table 100.18).
  expect(thermal.map((s) => s.judgement.measuredLevel)).toContain(2);
  expect(thermal.map((s) => s.judgement.level)).toContain(4);
  expect(groundChecks).toHaveLength(2);
  expect(groundChecks[0].judgement.words).toBe(
    "Phase B lamp dim, A and C bright: suspect a ground on phase B — on a vessel, a fault to the hull.",
  );
  expect(groundChecks[1].judgement.verdict).toBe("meets");
});

it("the demo's survey and dry-out are logged in working hours on the site's own clock (ICU's reading of its zone)", async () => {
  const zone = (await t.db.selectFrom("sites").select("timeZone").where("id", "=", siteId).executeTakeFirstOrThrow())
    .timeZone;
  expect(zone).toBe("America/Halifax");
  const hourOf = (at: Date | string) => Number(icuMinute(at, zone).slice(11, 13));
  const { insulation } = await reads.boardReadings(t.db, siteId, boardId);
  const dryOut = insulation.filter((x) => ["1-1", "1-2", "BUS-A"].includes(x.designation ?? ""));
  const inspections = await t.db.selectFrom("inspections").select("inspectedAt").execute();
  const photos = await t.db.selectFrom("photos").select("createdAt").execute();
  expect(dryOut.length + inspections.length + photos.length).toBeGreaterThan(30);
  for (const at of [
    ...dryOut.map((r) => r.measuredAt),
    ...inspections.map((i) => i.inspectedAt),
    ...photos.map((p) => p.createdAt),
  ]) {
    expect(hourOf(at)).toBeGreaterThanOrEqual(7);
    expect(hourOf(at)).toBeLessThanOrEqual(18);
  }
});
