import { afterAll, beforeAll, expect, it } from "vitest";
import { seedDemo } from "../../server/seed/demo";
import { priorityScore } from "../../src/domain/priority";
import { createTestDb, type TestDb } from "../helpers/db";

let t: TestDb;
beforeAll(async () => {
  t = await createTestDb();
  await seedDemo(t.db);
});
afterAll(async () => t.drop());

it("the demo seed raises about 60 defects from inspections, across the workflow, some pinned with reasons", async () => {
  const rows = await t.db
    .selectFrom("defects as d")
    .leftJoin("components as c", "c.id", "d.componentId")
    .select([
      "d.id",
      "d.status",
      "d.inspectionId",
      "d.severity",
      "d.safetyCritical",
      "d.blocksEnergisation",
      "d.effortHours",
      "d.partsState",
      "d.priorityScore",
      "d.repairedBy",
      "d.verifiedBy",
      "d.assigneeId",
      "c.heritage",
    ])
    .execute();
  expect(rows.length).toBeGreaterThanOrEqual(55);
  // Every defect comes from an inspection, except the return-to-service demo's incident defect.
  expect(rows.filter((r) => !r.inspectionId).length).toBeLessThanOrEqual(1);
  expect(new Set(rows.map((r) => r.status)).size).toBeGreaterThanOrEqual(6);
  expect(new Set(rows.map((r) => r.assigneeId).filter(Boolean)).size).toBeGreaterThanOrEqual(2);
  // the stored score is what src/domain/priority.ts computes from the stored fields
  for (const r of rows)
    expect(r.priorityScore).toBe(
      priorityScore({
        severity: r.severity,
        safetyCritical: r.safetyCritical,
        blocksEnergisation: r.blocksEnergisation,
        originalFabric: r.heritage === "original",
        effortHours: r.effortHours,
        partsAvailable: r.partsState,
      }).score,
    );
  for (const r of rows.filter((x) => x.status === "closed")) {
    expect(r.verifiedBy).toBeTruthy();
    expect(r.verifiedBy).not.toBe(r.repairedBy);
  }
  const pins = await t.db.selectFrom("defectPins").selectAll().where("removedAt", "is", null).execute();
  expect(pins.length).toBe(3);
  expect(pins.every((p) => p.reason.length > 10 && p.pinnedBy)).toBe(true);
});
