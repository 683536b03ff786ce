import { Kysely, sql } from "kysely";

// Readings as a flooded board gives them. A 0 MΩ reading (dead short) is kept;
// a reading may be "at or above" the meter's range or "below" its resolution; the site's
// dew-point margin; the system capacitance for the ground-lamp model; breaker trip tests,
// step-voltage tests and the ground-hunt log. Frozen in time: no app imports.

const QUALIFIER = "IN ('at_or_above', 'below')";
const LAMP = "IN ('bright', 'dim', 'dark')";

export async function up(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE insulation_readings DROP CONSTRAINT IF EXISTS insulation_readings_megohms_check`.execute(db);
  await sql`ALTER TABLE insulation_readings ADD CONSTRAINT insulation_readings_megohms_check CHECK (megohms >= 0)`.execute(
    db,
  );
  for (const col of ["megohms_qualifier", "r30s_qualifier", "r1min_qualifier", "r10min_qualifier"]) {
    await db.schema
      .alterTable("insulation_readings")
      .addColumn(col, "text", (c) => c.check(sql.raw(`${col} ${QUALIFIER}`)))
      .execute();
  }
  await db.schema
    .alterTable("reading_criteria")
    .addColumn("dew_point_margin_k", "double precision", (c) =>
      c
        .notNull()
        .defaultTo(3)
        .check(sql`dew_point_margin_k BETWEEN 0 AND 20`),
    )
    .execute();
  await db.schema
    .alterTable("ground_lamp_checks")
    .addColumn("capacitance_micro_f", "double precision", (c) => c.check(sql`capacitance_micro_f >= 0`))
    .execute();

  const id = (b: any) => b.addColumn("id", "uuid", (c: any) => c.primaryKey().defaultTo(sql`gen_random_uuid()`));
  const common = (b: any) =>
    b
      .addColumn("site_id", "uuid", (c: any) => c.notNull().references("sites.id").onDelete("cascade"))
      .addColumn("board_id", "uuid", (c: any) => c.notNull().references("boards.id").onDelete("cascade"))
      .addColumn("measured_at", "timestamptz", (c: any) => c.notNull())
      .addColumn("instrument", "text", (c: any) => c.notNull().defaultTo(""))
      .addColumn("notes", "text", (c: any) => c.notNull().defaultTo(""))
      .addColumn("recorded_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
      .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`));

  await common(id(db.schema.createTable("trip_tests")))
    .addColumn("component_id", "uuid", (c: any) => c.notNull().references("components.id").onDelete("cascade"))
    .addColumn("test", "text", (c: any) => c.notNull().check(sql`test IN ('inverse_time', 'instantaneous')`))
    .addColumn("trip_unit", "text", (c: any) => c.notNull().check(sql`trip_unit IN ('thermal_magnetic', 'electronic')`))
    .addColumn("adjustable", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("pole", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("rating_amps", "double precision", (c: any) => c.notNull().check(sql`rating_amps > 0`))
    .addColumn("system_volts", "double precision", (c: any) => c.notNull().check(sql`system_volts > 0`))
    .addColumn("test_amps", "double precision", (c: any) => c.check(sql`test_amps > 0`))
    .addColumn("trip_seconds", "double precision", (c: any) => c.check(sql`trip_seconds >= 0`))
    .addColumn("band_min_seconds", "double precision", (c: any) => c.check(sql`band_min_seconds >= 0`))
    .addColumn("band_max_seconds", "double precision", (c: any) => c.check(sql`band_max_seconds >= 0`))
    .addColumn("setting_amps", "double precision", (c: any) => c.check(sql`setting_amps > 0`))
    .addColumn("published_low_amps", "double precision", (c: any) => c.check(sql`published_low_amps > 0`))
    .addColumn("published_high_amps", "double precision", (c: any) => c.check(sql`published_high_amps > 0`))
    .addColumn("pickup_amps", "double precision", (c: any) => c.check(sql`pickup_amps > 0`))
    .execute();

  await common(id(db.schema.createTable("step_voltage_tests")))
    .addColumn("component_id", "uuid", (c: any) => c.references("components.id").onDelete("set null"))
    .addColumn("circuit", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("conductors", "text", (c: any) => c.notNull())
    .addColumn("equipment_temp_c", "double precision")
    .addColumn("step_volts", sql`integer[]`, (c: any) => c.notNull())
    .addColumn("step_megohms", sql`double precision[]`, (c: any) => c.notNull())
    .addCheckConstraint("step_voltage_tests_target_ck", sql`component_id IS NOT NULL OR circuit <> ''`)
    .addCheckConstraint(
      "step_voltage_tests_steps_ck",
      sql`cardinality(step_volts) = cardinality(step_megohms) AND cardinality(step_volts) >= 2`,
    )
    .execute();

  await common(id(db.schema.createTable("ground_hunt_steps")))
    .addColumn("hunt", "text", (c: any) => c.notNull())
    .addColumn("position_id", "uuid", (c: any) => c.references("positions.id").onDelete("set null"))
    .addColumn("feeder", "text", (c: any) => c.notNull())
    .addColumn("action", "text", (c: any) => c.notNull().check(sql`action IN ('opened', 'closed')`))
    .addColumn("lamp_a", "text", (c: any) => c.notNull().check(sql.raw(`lamp_a ${LAMP}`)))
    .addColumn("lamp_b", "text", (c: any) => c.notNull().check(sql.raw(`lamp_b ${LAMP}`)))
    .addColumn("lamp_c", "text", (c: any) => c.notNull().check(sql.raw(`lamp_c ${LAMP}`)))
    .execute();

  const idx = async (name: string, table: string, cols: string[]) =>
    db.schema.createIndex(name).on(table).columns(cols).execute();
  for (const table of ["trip_tests", "step_voltage_tests", "ground_hunt_steps"]) {
    await idx(`${table}_board_idx`, table, ["board_id", "measured_at"]);
    await idx(`${table}_site_idx`, table, ["site_id", "measured_at"]);
    await idx(`${table}_recorded_by_idx`, table, ["recorded_by"]);
  }
  await idx("trip_tests_component_idx", "trip_tests", ["component_id", "measured_at"]);
  await idx("step_voltage_tests_component_idx", "step_voltage_tests", ["component_id", "measured_at"]);
  await idx("ground_hunt_steps_position_idx", "ground_hunt_steps", ["position_id"]);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const table of ["ground_hunt_steps", "step_voltage_tests", "trip_tests"])
    await db.schema.dropTable(table).execute();
  await db.schema.alterTable("ground_lamp_checks").dropColumn("capacitance_micro_f").execute();
  await db.schema.alterTable("reading_criteria").dropColumn("dew_point_margin_k").execute();
  for (const col of ["megohms_qualifier", "r30s_qualifier", "r1min_qualifier", "r10min_qualifier"])
    await db.schema.alterTable("insulation_readings").dropColumn(col).execute();
  await sql`DELETE FROM insulation_readings WHERE megohms = 0`.execute(db);
  await sql`ALTER TABLE insulation_readings DROP CONSTRAINT IF EXISTS insulation_readings_megohms_check`.execute(db);
  await sql`ALTER TABLE insulation_readings ADD CONSTRAINT insulation_readings_megohms_check CHECK (megohms > 0)`.execute(
    db,
  );
}
