import { Kysely, sql } from "kysely";

// Return to service: a board's staged re-energisation plan, its hold points and
// their sign-offs (append-only), the energisation log, watch checks, incidents, breaker
// operations and their budgets, the site's qualified persons and settings, and the record of
// overdue-watch notices sent. Frozen in time: no app imports.

const list = (values: readonly string[]) => sql.raw(values.map((v) => `'${v}'`).join(", "));
const SUPPLY = ["temporary_fused", "external", "normal"];
const VOLTAGE_STEP = ["reduced", "full"];
const STAGE_STATUS = ["planned", "energised", "stopped", "de_energised", "released"];
const STEP_KIND = [
  "isolate",
  "insulation",
  "defects",
  "protection",
  "clearance",
  "energise",
  "ground_lamps",
  "thermal",
  "watch",
  "release",
  "custom",
];
const SIGNOFF_KIND = ["signed", "released", "struck"];
const LAMPS = ["equal", "one_dim", "one_dark", "not_seen"];
const INCIDENT = ["protection_operated", "dark_lamp", "hot_spot", "low_insulation", "other"];

export async function up(db: Kysely<any>): Promise<void> {
  const id = (t: any) => t.addColumn("id", "uuid", (c: any) => c.primaryKey().defaultTo(sql`gen_random_uuid()`));
  const site = (t: any) =>
    t.addColumn("site_id", "uuid", (c: any) => c.notNull().references("sites.id").onDelete("cascade"));
  const user = (name: string) => (t: any) =>
    t.addColumn(name, "uuid", (c: any) => c.references("users.id").onDelete("set null"));
  const stamps = (t: any) =>
    t
      .addColumn("version", "integer", (c: any) => c.notNull().defaultTo(1))
      .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
      .addColumn("updated_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`));

  await stamps(user("updated_by")(site(id(db.schema.createTable("rts_qualified_persons")))))
    .addColumn("user_id", "uuid", (c: any) => c.notNull().references("users.id").onDelete("cascade"))
    .addColumn("qualification", "text", (c: any) => c.notNull())
    .addColumn("expires_on", "date")
    .addUniqueConstraint("rts_qualified_persons_site_user_uq", ["site_id", "user_id"])
    .execute();

  await user("updated_by")(db.schema.createTable("rts_settings"))
    .addColumn("site_id", "uuid", (c: any) => c.primaryKey().references("sites.id").onDelete("cascade"))
    .addColumn("insulation_max_age_days", "integer", (c: any) =>
      c
        .notNull()
        .defaultTo(7)
        .check(sql`insulation_max_age_days BETWEEN 1 AND 365`),
    )
    .addColumn("template", "jsonb", (c: any) => c.notNull())
    .addColumn("version", "integer", (c: any) => c.notNull().defaultTo(1))
    .addColumn("updated_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await stamps(user("qualified_person_id")(site(id(db.schema.createTable("rts_stages")))))
    .addColumn("board_id", "uuid", (c: any) => c.notNull().references("boards.id").onDelete("cascade"))
    .addColumn("sort_order", "integer", (c: any) => c.notNull())
    .addColumn("name", "text", (c: any) => c.notNull())
    .addColumn("supply", "text", (c: any) => c.notNull().check(sql`supply IN (${list(SUPPLY)})`))
    .addColumn("protection_device", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("protection_rating_a", "double precision", (c: any) => c.check(sql`protection_rating_a > 0`))
    .addColumn("protection_limit_a", "double precision", (c: any) => c.check(sql`protection_limit_a > 0`))
    .addColumn("voltage_step", "text", (c: any) => c.notNull().check(sql`voltage_step IN (${list(VOLTAGE_STEP)})`))
    .addColumn("step_volts", "double precision", (c: any) => c.check(sql`step_volts > 0`))
    .addColumn("depends_on_id", "uuid", (c: any) => c.references("rts_stages.id").onDelete("set null"))
    .addColumn("watch_hours", "double precision", (c: any) =>
      c
        .notNull()
        .defaultTo(24)
        .check(sql`watch_hours >= 0`),
    )
    .addColumn("check_every_hours", "double precision", (c: any) =>
      c
        .notNull()
        .defaultTo(4)
        .check(sql`check_every_hours > 0`),
    )
    .addColumn("status", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("planned")
        .check(sql`status IN (${list(STAGE_STATUS)})`),
    )
    .addColumn("attempt", "integer", (c: any) => c.notNull().defaultTo(1))
    .addColumn("energised_at", "timestamptz")
    .addColumn("released_at", "timestamptz")
    .addColumn("notes", "text", (c: any) => c.notNull().defaultTo(""))
    .execute();

  await site(id(db.schema.createTable("rts_stage_items")))
    .addColumn("stage_id", "uuid", (c: any) => c.notNull().references("rts_stages.id").onDelete("cascade"))
    .addColumn("section_id", "uuid", (c: any) => c.references("sections.id").onDelete("cascade"))
    .addColumn("position_id", "uuid", (c: any) => c.references("positions.id").onDelete("cascade"))
    .addCheckConstraint("rts_stage_items_one_ck", sql`(section_id IS NULL) <> (position_id IS NULL)`)
    .execute();

  await stamps(site(id(db.schema.createTable("rts_steps"))))
    .addColumn("stage_id", "uuid", (c: any) => c.notNull().references("rts_stages.id").onDelete("cascade"))
    .addColumn("sort_order", "integer", (c: any) => c.notNull())
    .addColumn("kind", "text", (c: any) => c.notNull().check(sql`kind IN (${list(STEP_KIND)})`))
    .addColumn("title", "text", (c: any) => c.notNull())
    .addColumn("detail", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("qualified_only", "boolean", (c: any) => c.notNull().defaultTo(false))
    .execute();

  // Sign-offs are append-only: a correction is a new row that supersedes the old one.
  // Only one first entry per hold point and attempt, and each entry superseded at most
  // once: two people signing the same hold point at once cannot both win.
  await user("signed_by")(site(id(db.schema.createTable("rts_signoffs"))))
    .addColumn("stage_id", "uuid", (c: any) => c.notNull().references("rts_stages.id").onDelete("cascade"))
    .addColumn("step_id", "uuid", (c: any) => c.notNull().references("rts_steps.id").onDelete("cascade"))
    .addColumn("attempt", "integer", (c: any) => c.notNull())
    .addColumn("kind", "text", (c: any) => c.notNull().check(sql`kind IN (${list(SIGNOFF_KIND)})`))
    .addColumn("signer_name", "text", (c: any) => c.notNull())
    .addColumn("signed_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .addColumn("reason", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("note", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("evidence", "jsonb", (c: any) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn("supersedes_id", "uuid", (c: any) => c.unique().references("rts_signoffs.id").onDelete("cascade"))
    .execute();
  await sql`CREATE UNIQUE INDEX rts_signoffs_first_uq ON rts_signoffs (step_id, attempt) WHERE supersedes_id IS NULL`.execute(
    db,
  );
  await sql`CREATE FUNCTION rts_signoffs_immutable() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      -- The one change allowed: a deleted account's id set to null (its name stays in signer_name).
      IF NEW.signed_by IS NULL AND (NEW.id, NEW.step_id, NEW.attempt, NEW.kind, NEW.signer_name, NEW.signed_at, NEW.reason, NEW.note, NEW.evidence, NEW.supersedes_id)
         IS NOT DISTINCT FROM (OLD.id, OLD.step_id, OLD.attempt, OLD.kind, OLD.signer_name, OLD.signed_at, OLD.reason, OLD.note, OLD.evidence, OLD.supersedes_id) THEN
        RETURN NEW;
      END IF;
      RAISE EXCEPTION 'rts_signoffs rows cannot be changed; add a superseding entry' USING ERRCODE = 'check_violation';
    END $$`.execute(db);
  await sql`CREATE TRIGGER rts_signoffs_no_update BEFORE UPDATE ON rts_signoffs FOR EACH ROW EXECUTE FUNCTION rts_signoffs_immutable()`.execute(
    db,
  );

  await user("recorded_by")(site(id(db.schema.createTable("rts_energisations"))))
    .addColumn("board_id", "uuid", (c: any) => c.notNull().references("boards.id").onDelete("cascade"))
    .addColumn("stage_id", "uuid", (c: any) => c.notNull().references("rts_stages.id").onDelete("cascade"))
    .addColumn("attempt", "integer", (c: any) => c.notNull())
    .addColumn("kind", "text", (c: any) => c.notNull().check(sql`kind IN ('energise', 'de_energise')`))
    .addColumn("at", "timestamptz", (c: any) => c.notNull())
    .addColumn("supply", "text", (c: any) => c.notNull().check(sql`supply IN (${list(SUPPLY)})`))
    .addColumn("volts", "double precision")
    .addColumn("protection_device", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("protection_rating_a", "double precision")
    .addColumn("note", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await user("recorded_by")(site(id(db.schema.createTable("rts_watch_checks"))))
    .addColumn("stage_id", "uuid", (c: any) => c.notNull().references("rts_stages.id").onDelete("cascade"))
    .addColumn("attempt", "integer", (c: any) => c.notNull())
    .addColumn("at", "timestamptz", (c: any) => c.notNull())
    .addColumn("lamps", "text", (c: any) => c.notNull().check(sql`lamps IN (${list(LAMPS)})`))
    .addColumn("lamp_phase", "text", (c: any) => c.check(sql`lamp_phase IN ('A', 'B', 'C')`))
    .addColumn("smell", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("sound", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("warm_to_hand", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("thermal_position_id", "uuid", (c: any) => c.references("positions.id").onDelete("set null"))
    .addColumn("thermal_c", "double precision")
    .addColumn("ambient_c", "double precision")
    .addColumn("note", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await user("recorded_by")(site(id(db.schema.createTable("rts_incidents"))))
    .addColumn("board_id", "uuid", (c: any) => c.notNull().references("boards.id").onDelete("cascade"))
    .addColumn("stage_id", "uuid", (c: any) => c.notNull().references("rts_stages.id").onDelete("cascade"))
    .addColumn("attempt", "integer", (c: any) => c.notNull())
    .addColumn("at", "timestamptz", (c: any) => c.notNull())
    .addColumn("kind", "text", (c: any) => c.notNull().check(sql`kind IN (${list(INCIDENT)})`))
    .addColumn("position_id", "uuid", (c: any) => c.references("positions.id").onDelete("set null"))
    .addColumn("defect_id", "uuid", (c: any) => c.references("defects.id").onDelete("set null"))
    .addColumn("watch_check_id", "uuid", (c: any) => c.references("rts_watch_checks.id").onDelete("set null"))
    .addColumn("reading_kind", "text", (c: any) => c.check(sql`reading_kind IN ('thermal_scan', 'insulation_reading')`))
    .addColumn("reading_id", "uuid")
    .addColumn("summary", "text", (c: any) => c.notNull())
    .addColumn("note", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await user("operated_by")(site(id(db.schema.createTable("rts_breaker_operations"))))
    .addColumn("board_id", "uuid", (c: any) => c.notNull().references("boards.id").onDelete("cascade"))
    .addColumn("component_id", "uuid", (c: any) => c.notNull().references("components.id").onDelete("cascade"))
    .addColumn("stage_id", "uuid", (c: any) => c.references("rts_stages.id").onDelete("set null"))
    .addColumn("operation", "text", (c: any) => c.notNull().check(sql`operation IN ('open', 'close')`))
    .addColumn("at", "timestamptz", (c: any) => c.notNull())
    .addColumn("why", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await stamps(user("updated_by")(site(id(db.schema.createTable("rts_operation_budgets")))))
    .addColumn("component_id", "uuid", (c: any) => c.notNull().unique().references("components.id").onDelete("cascade"))
    .addColumn("budget", "integer", (c: any) => c.notNull().check(sql`budget >= 0`))
    .addColumn("reason", "text", (c: any) => c.notNull().defaultTo(""))
    .execute();

  await user("sent_to")(site(id(db.schema.createTable("rts_overdue_notices"))))
    .addColumn("stage_id", "uuid", (c: any) => c.notNull().references("rts_stages.id").onDelete("cascade"))
    .addColumn("attempt", "integer", (c: any) => c.notNull())
    .addColumn("due_at", "timestamptz", (c: any) => c.notNull())
    .addColumn("outcome", "text", (c: any) => c.notNull())
    .addColumn("error", "text")
    .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint("rts_overdue_notices_uq", ["stage_id", "attempt", "due_at"])
    .execute();

  // A notification switch of its own ("watch_overdue"): add it to whatever keys the
  // notification_prefs check allows by then (other migrations may have added theirs).
  await sql`DO $$
    DECLARE def text;
    BEGIN
      SELECT pg_get_constraintdef(oid) INTO def FROM pg_constraint WHERE conname = 'notification_prefs_key_check';
      IF def IS NOT NULL AND position('watch_overdue' in def) = 0 THEN
        ALTER TABLE notification_prefs DROP CONSTRAINT notification_prefs_key_check;
        EXECUTE 'ALTER TABLE notification_prefs ADD CONSTRAINT notification_prefs_key_check ' || replace(def, 'ARRAY[', 'ARRAY[''watch_overdue''::text, ');
      END IF;
    END $$`.execute(db);

  const idx = async (name: string, table: string, cols: string[]) =>
    db.schema.createIndex(name).on(table).columns(cols).execute();
  await idx("rts_qualified_persons_user_idx", "rts_qualified_persons", ["user_id"]);
  await idx("rts_qualified_persons_updated_by_idx", "rts_qualified_persons", ["updated_by"]);
  await idx("rts_settings_updated_by_idx", "rts_settings", ["updated_by"]);
  await idx("rts_stages_board_idx", "rts_stages", ["board_id", "sort_order"]);
  await idx("rts_stages_site_idx", "rts_stages", ["site_id"]);
  await idx("rts_stages_depends_on_idx", "rts_stages", ["depends_on_id"]);
  await idx("rts_stages_qp_idx", "rts_stages", ["qualified_person_id"]);
  await idx("rts_stage_items_stage_idx", "rts_stage_items", ["stage_id"]);
  await idx("rts_stage_items_section_idx", "rts_stage_items", ["section_id"]);
  await idx("rts_stage_items_position_idx", "rts_stage_items", ["position_id"]);
  await idx("rts_stage_items_site_idx", "rts_stage_items", ["site_id"]);
  await idx("rts_steps_stage_idx", "rts_steps", ["stage_id", "sort_order"]);
  await idx("rts_steps_site_idx", "rts_steps", ["site_id"]);
  await idx("rts_signoffs_stage_idx", "rts_signoffs", ["stage_id", "signed_at"]);
  await idx("rts_signoffs_step_idx", "rts_signoffs", ["step_id"]);
  await idx("rts_signoffs_site_idx", "rts_signoffs", ["site_id"]);
  await idx("rts_signoffs_signed_by_idx", "rts_signoffs", ["signed_by"]);
  for (const t of ["rts_energisations", "rts_watch_checks", "rts_incidents"]) {
    await idx(`${t}_stage_idx`, t, ["stage_id", "at"]);
    await idx(`${t}_site_idx`, t, ["site_id"]);
    await idx(`${t}_recorded_by_idx`, t, ["recorded_by"]);
  }
  await idx("rts_energisations_board_idx", "rts_energisations", ["board_id", "at"]);
  await idx("rts_incidents_board_idx", "rts_incidents", ["board_id", "at"]);
  await idx("rts_incidents_position_idx", "rts_incidents", ["position_id"]);
  await idx("rts_incidents_defect_idx", "rts_incidents", ["defect_id"]);
  await idx("rts_incidents_watch_check_idx", "rts_incidents", ["watch_check_id"]);
  await idx("rts_incidents_reading_idx", "rts_incidents", ["reading_id"]);
  await idx("rts_watch_checks_thermal_position_idx", "rts_watch_checks", ["thermal_position_id"]);
  await idx("rts_breaker_operations_component_idx", "rts_breaker_operations", ["component_id", "at"]);
  await idx("rts_breaker_operations_board_idx", "rts_breaker_operations", ["board_id", "at"]);
  await idx("rts_breaker_operations_stage_idx", "rts_breaker_operations", ["stage_id"]);
  await idx("rts_breaker_operations_site_idx", "rts_breaker_operations", ["site_id"]);
  await idx("rts_breaker_operations_operated_by_idx", "rts_breaker_operations", ["operated_by"]);
  await idx("rts_operation_budgets_site_idx", "rts_operation_budgets", ["site_id"]);
  await idx("rts_operation_budgets_updated_by_idx", "rts_operation_budgets", ["updated_by"]);
  await idx("rts_overdue_notices_site_idx", "rts_overdue_notices", ["site_id"]);
  await idx("rts_overdue_notices_sent_to_idx", "rts_overdue_notices", ["sent_to"]);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of [
    "rts_overdue_notices",
    "rts_operation_budgets",
    "rts_breaker_operations",
    "rts_incidents",
    "rts_watch_checks",
    "rts_energisations",
    "rts_signoffs",
    "rts_steps",
    "rts_stage_items",
    "rts_stages",
    "rts_settings",
    "rts_qualified_persons",
  ])
    await db.schema.dropTable(t).execute();
  await sql`DROP FUNCTION IF EXISTS rts_signoffs_immutable()`.execute(db);
}
