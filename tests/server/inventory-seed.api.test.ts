import { afterAll, beforeAll, expect, it } from "vitest";
import { sql } from "kysely";
import { seedDemo } from "../../server/seed/demo";
import { astmD610Grade } from "../../src/domain/corrosion";
import { createTestDb, type TestDb } from "../helpers/db";

let t: TestDb;
beforeAll(async () => {
  t = await createTestDb();
  await seedDemo(t.db);
});
afterAll(async () => t.drop());

const col = async (q: string) => (await sql.raw<{ v: string }>(q).execute(t.db)).rows.map((r) => r.v);

it("the demo seed lays out at least 120 positions on two or more boards, each with one current component", async () => {
  const [{ boards, positions, components }] = (
    await sql<{
      boards: number;
      positions: number;
      components: number;
    }>`select (select count(*) from boards)::int as boards,
      (select count(*) from positions)::int as positions, (select count(*) from components where retired_at is null)::int as components`.execute(
      t.db,
    )
  ).rows;
  expect(boards).toBeGreaterThanOrEqual(2);
  expect(positions).toBeGreaterThanOrEqual(120);
  expect(components).toBe(positions);
  const sections = await col("select distinct board_id::text as v from sections");
  expect(sections.length).toBe(boards);
});

it("the demo seed has every custody state, every disposition, overrides with reasons and a spread of grades", async () => {
  expect((await col("select distinct custody as v from components")).sort()).toEqual([
    "in_place",
    "in_workshop",
    "missing",
    "ready_to_refit",
    "refitted",
    "removed",
    "scrapped",
  ]);
  expect((await col("select distinct disposition as v from components where disposition is not null")).sort()).toEqual([
    "clean",
    "rebuild",
    "replace",
    "source",
  ]);
  expect(await col("select count(*)::text as v from components where disposition is null")).not.toEqual(["0"]);
  const overrides = await col("select disposition_reason as v from components where disposition_overridden");
  expect(overrides.length).toBeGreaterThanOrEqual(3);
  expect(overrides.every((r) => r.length > 10)).toBe(true);
  const grades = (await col("select distinct astm_grade::text as v from inspections where astm_grade is not null")).map(
    Number,
  );
  expect(grades.length).toBeGreaterThanOrEqual(9);
  expect(await col("select distinct below_water_line::text as v from inspections order by 1")).toEqual([
    "false",
    "true",
  ]);
  expect((await col("select distinct heritage as v from components")).sort()).toEqual(["modern", "original", "period"]);
  expect(await col("select tag_number as v from components where tag_number = 'KL-0412'")).toEqual(["KL-0412"]);
  // Positions without any inspection exist, so 'not surveyed' shows too.
  expect(
    await col(
      "select count(*)::text as v from positions p where not exists (select 1 from inspections i where i.position_id = p.id)",
    ),
  ).not.toEqual(["0"]);
});

it("stored grades agree with astmD610Grade and every custody state has its moves and audit rows", async () => {
  const rows = (
    await sql<{
      p: number;
      g: number;
    }>`select percent_rusted as p, astm_grade as g from inspections where percent_rusted is not null`.execute(t.db)
  ).rows;
  for (const r of rows) expect(r.g).toBe(astmD610Grade(Number(r.p))); // ASTM D610-08 Table 1 via the domain function
  const orphan = await col(`select c.id::text as v from components c where c.custody <> 'in_place'
    and not exists (select 1 from custody_moves m where m.component_id = c.id and m.to_state = c.custody)`);
  expect(orphan).toEqual([]);
  expect(
    Number((await col("select count(*)::text as v from audit_log where position_id is not null"))[0]),
  ).toBeGreaterThan(300);
  expect((await col("select distinct action as v from audit_log")).sort()).toEqual(
    expect.arrayContaining(["create", "custody", "disposition", "inspect"]),
  );
});

it("a position above the water line on the flooded board is never recorded as below it, and one below never above", async () => {
  const wrong =
    await col(`select p.designation as v from inspections i join positions p on p.id = i.position_id join boards b on b.id = p.board_id
    where b.water_line_mm is not null and i.below_water_line <> (b.face_height_mm - (p.grid_row - 1 + p.row_span) * (b.face_height_mm::numeric / b.grid_rows) < b.water_line_mm)`);
  expect(wrong).toEqual([]);
});

it("a demo meter's scale fits what its circuit says it measures (a voltmeter reads volts, not hertz)", async () => {
  const rows = (
    await sql<{ circuit: string; range: string }>`select p.circuit, c.meter_range as range from components c
      join positions p on p.id = c.position_id where c.kind = 'meter' and c.retired_at is null`.execute(t.db)
  ).rows;
  expect(rows.length).toBeGreaterThan(4);
  const unit = (circuit: string) =>
    /frequency/i.test(circuit) ? "Hz" : /kilowatt/i.test(circuit) ? "kW" : /ammeter/i.test(circuit) ? "A" : "V";
  for (const r of rows.filter((x) => /voltmeter|ammeter|kilowatt|frequency/i.test(x.circuit)))
    expect(r.range, r.circuit).toMatch(new RegExp(` ${unit(r.circuit)}$`));
});
