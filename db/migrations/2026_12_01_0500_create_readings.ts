import { Kysely, sql } from "kysely";

// Electrical test readings (insulation, pole contact resistance, thermal scans, ground-lamp
// checks) and the per-site criteria they are judged against. Readings are stored raw; the
// corrected values and verdicts are computed on every read from the current criteria, so a
// curator's change of criteria re-judges the whole history. Frozen in time: no app imports.

const list = (values: readonly string[]) => sql.raw(values.map((v) => `'${v}'`).join(", "));
const CONDUCTORS = ["A-B", "B-C", "C-A", "A-G", "B-G", "C-G", "line-load"];
const LAMP = ["bright", "dim", "dark"];

export async function up(db: Kysely<any>): Promise<void> {
  const id = (t: any) => t.addColumn("id", "uuid", (c: any) => c.primaryKey().defaultTo(sql`gen_random_uuid()`));
  const site = (t: any) =>
    t.addColumn("site_id", "uuid", (c: any) => c.notNull().references("sites.id").onDelete("cascade"));
  const board = (t: any) =>
    t.addColumn("board_id", "uuid", (c: any) => c.notNull().references("boards.id").onDelete("cascade"));
  const common = (t: any) =>
    t
      .addColumn("measured_at", "timestamptz", (c: any) => c.notNull())
      .addColumn("instrument", "text", (c: any) => c.notNull().defaultTo(""))
      .addColumn("notes", "text", (c: any) => c.notNull().defaultTo(""))
      .addColumn("recorded_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
      .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`));

  await common(board(site(id(db.schema.createTable("insulation_readings")))))
    .addColumn("component_id", "uuid", (c: any) => c.references("components.id").onDelete("set null"))
    .addColumn("circuit", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("test_volts_dc", "integer", (c: any) => c.notNull().check(sql`test_volts_dc > 0`))
    .addColumn("megohms", "double precision", (c: any) => c.notNull().check(sql`megohms > 0`))
    .addColumn("conductors", "text", (c: any) => c.notNull().check(sql`conductors IN (${list(CONDUCTORS)})`))
    .addColumn("equipment_temp_c", "double precision", (c: any) => c.notNull())
    .addColumn("ambient_temp_c", "double precision")
    .addColumn("humidity_percent", "double precision", (c: any) => c.check(sql`humidity_percent BETWEEN 0 AND 100`))
    .addColumn("duration_s", "integer")
    .addColumn("r30s_megohms", "double precision")
    .addColumn("r1min_megohms", "double precision")
    .addColumn("r10min_megohms", "double precision")
    .addCheckConstraint("insulation_readings_target_ck", sql`component_id IS NOT NULL OR circuit <> ''`)
    .execute();

  await common(board(site(id(db.schema.createTable("contact_readings")))))
    .addColumn("component_id", "uuid", (c: any) => c.notNull().references("components.id").onDelete("cascade"))
    .addColumn("pole_micro_ohms", sql`double precision[]`, (c: any) => c.notNull())
    .addColumn("test_current_a", "double precision", (c: any) => c.notNull().check(sql`test_current_a > 0`))
    .execute();

  await common(board(site(id(db.schema.createTable("thermal_scans")))))
    .addColumn("component_id", "uuid", (c: any) => c.notNull().references("components.id").onDelete("cascade"))
    .addColumn("component_temp_c", "double precision", (c: any) => c.notNull())
    .addColumn("similar_temp_c", "double precision")
    .addColumn("ambient_temp_c", "double precision")
    .addColumn("load_percent", "double precision")
    .addColumn("load_amps", "double precision")
    .addColumn("photo_id", "uuid", (c: any) => c.references("photos.id").onDelete("set null"))
    .addCheckConstraint("thermal_scans_reference_ck", sql`similar_temp_c IS NOT NULL OR ambient_temp_c IS NOT NULL`)
    .execute();

  await common(board(site(id(db.schema.createTable("ground_lamp_checks")))))
    .addColumn("energisation", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("line_volts", "double precision", (c: any) => c.notNull().check(sql`line_volts > 0`))
    .addColumn("lamp_a", "text", (c: any) => c.check(sql`lamp_a IN (${list(LAMP)})`))
    .addColumn("lamp_b", "text", (c: any) => c.check(sql`lamp_b IN (${list(LAMP)})`))
    .addColumn("lamp_c", "text", (c: any) => c.check(sql`lamp_c IN (${list(LAMP)})`))
    .addColumn("volts_a", "double precision")
    .addColumn("volts_b", "double precision")
    .addColumn("volts_c", "double precision")
    .addColumn("branch_ohms", "double precision")
    .execute();

  await db.schema
    .createTable("reading_criteria")
    .addColumn("site_id", "uuid", (c: any) => c.primaryKey().references("sites.id").onDelete("cascade"))
    .addColumn("correction_method", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("neta_20c")
        .check(sql`correction_method IN ('ieee43_40c', 'neta_20c')`),
    )
    .addColumn("insulation_medium", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("solid")
        .check(sql`insulation_medium IN ('solid', 'oil')`),
    )
    .addColumn("thermal_class", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("B")
        .check(sql`thermal_class IN ('A', 'B', 'F', 'H')`),
    )
    .addColumn("minimum_megohms", "double precision", (c: any) => c.check(sql`minimum_megohms > 0`))
    .addColumn("minimum_source", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("contact_outlier_percent", "double precision", (c: any) =>
      c
        .notNull()
        .defaultTo(50)
        .check(sql`contact_outlier_percent > 0`),
    )
    .addColumn("version", "integer", (c: any) => c.notNull().defaultTo(1))
    .addColumn("updated_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("updated_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await site(id(db.schema.createTable("component_reading_overrides")))
    .addColumn("component_id", "uuid", (c: any) => c.notNull().unique().references("components.id").onDelete("cascade"))
    .addColumn("minimum_megohms", "double precision", (c: any) => c.check(sql`minimum_megohms > 0`))
    .addColumn("maximum_micro_ohms", "double precision", (c: any) => c.check(sql`maximum_micro_ohms > 0`))
    .addColumn("source", "text", (c: any) => c.notNull())
    .addColumn("version", "integer", (c: any) => c.notNull().defaultTo(1))
    .addColumn("updated_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("updated_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  const idx = async (name: string, table: string, cols: string[]) =>
    db.schema.createIndex(name).on(table).columns(cols).execute();
  for (const t of ["insulation_readings", "contact_readings", "thermal_scans", "ground_lamp_checks"]) {
    await idx(`${t}_board_idx`, t, ["board_id", "measured_at"]);
    await idx(`${t}_site_idx`, t, ["site_id", "measured_at"]);
    await idx(`${t}_recorded_by_idx`, t, ["recorded_by"]);
  }
  for (const t of ["insulation_readings", "contact_readings", "thermal_scans"])
    await idx(`${t}_component_idx`, t, ["component_id", "measured_at"]);
  await idx("insulation_readings_circuit_idx", "insulation_readings", ["board_id", "circuit", "measured_at"]);
  await idx("thermal_scans_photo_idx", "thermal_scans", ["photo_id"]);
  await idx("reading_criteria_updated_by_idx", "reading_criteria", ["updated_by"]);
  await idx("component_reading_overrides_site_idx", "component_reading_overrides", ["site_id"]);
  await idx("component_reading_overrides_updated_by_idx", "component_reading_overrides", ["updated_by"]);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of [
    "component_reading_overrides",
    "reading_criteria",
    "ground_lamp_checks",
    "thermal_scans",
    "contact_readings",
    "insulation_readings",
  ])
    await db.schema.dropTable(t).execute();
}
