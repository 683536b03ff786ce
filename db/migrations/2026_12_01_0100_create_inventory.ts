import { Kysely, sql } from "kysely";

// The inventory core: flood events, boards, sections, positions, components, the survey
// (inspections, dispositions, custody) and the audit trail; also the photo and defect
// tables other features hang on. Frozen in time: never import app code here.

const list = (values: readonly string[]) => sql.raw(values.map((v) => `'${v}'`).join(", "));
const KINDS = [
  "molded_case_breaker",
  "power_breaker",
  "meter",
  "ground_lamp",
  "fuse",
  "switch",
  "bus_tie",
  "busbar",
  "transformer",
  "relay",
  "terminal_strip",
  "other",
];
const CUSTODY = ["in_place", "removed", "in_workshop", "ready_to_refit", "refitted", "scrapped", "missing"];
const DISPOSITIONS = ["clean", "rebuild", "replace", "source"];

export async function up(db: Kysely<any>): Promise<void> {
  const id = (t: any) => t.addColumn("id", "uuid", (c: any) => c.primaryKey().defaultTo(sql`gen_random_uuid()`));
  const stamps = (t: any) =>
    t
      .addColumn("version", "integer", (c: any) => c.notNull().defaultTo(1))
      .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
      .addColumn("updated_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`));
  const site = (t: any) =>
    t.addColumn("site_id", "uuid", (c: any) => c.notNull().references("sites.id").onDelete("cascade"));

  await stamps(site(id(db.schema.createTable("flood_events"))))
    .addColumn("occurred_on", "date", (c: any) => c.notNull())
    .addColumn("water_type", "text", (c: any) =>
      c.notNull().check(sql`water_type IN ('fresh', 'brackish', 'salt', 'sewage')`),
    )
    .addColumn("max_depth_m", "numeric")
    .addColumn("hours_submerged", "numeric")
    .addColumn("notes", "text", (c: any) => c.notNull().defaultTo(""))
    .execute();

  await stamps(site(id(db.schema.createTable("boards"))))
    .addColumn("name", "text", (c: any) => c.notNull())
    .addColumn("location", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("nominal_volts", "integer", (c: any) => c.notNull().defaultTo(450))
    .addColumn("phases", "integer", (c: any) =>
      c
        .notNull()
        .defaultTo(3)
        .check(sql`phases IN (1, 3)`),
    )
    .addColumn("frequency_hz", "integer", (c: any) => c.notNull().defaultTo(60))
    .addColumn("earthing", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("ungrounded")
        .check(sql`earthing IN ('ungrounded', 'solid', 'resistance')`),
    )
    .addColumn("year_built", "integer")
    .addColumn("drawing_ref", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("face_height_mm", "integer")
    .addColumn("water_line_mm", "integer")
    .addColumn("grid_rows", "integer", (c: any) =>
      c
        .notNull()
        .defaultTo(6)
        .check(sql`grid_rows BETWEEN 1 AND 60`),
    )
    .addColumn("grid_cols", "integer", (c: any) =>
      c
        .notNull()
        .defaultTo(8)
        .check(sql`grid_cols BETWEEN 1 AND 60`),
    )
    .addColumn("notes", "text", (c: any) => c.notNull().defaultTo(""))
    .execute();

  await stamps(site(id(db.schema.createTable("sections"))))
    .addColumn("board_id", "uuid", (c: any) => c.notNull().references("boards.id").onDelete("cascade"))
    .addColumn("name", "text", (c: any) => c.notNull())
    .addColumn("sort_order", "integer", (c: any) => c.notNull().defaultTo(0))
    .addColumn("notes", "text", (c: any) => c.notNull().defaultTo(""))
    .execute();

  await stamps(site(id(db.schema.createTable("positions"))))
    .addColumn("board_id", "uuid", (c: any) => c.notNull().references("boards.id").onDelete("cascade"))
    .addColumn("section_id", "uuid", (c: any) => c.references("sections.id").onDelete("set null"))
    .addColumn("designation", "text", (c: any) => c.notNull())
    .addColumn("kind", "text", (c: any) => c.notNull().check(sql`kind IN (${list(KINDS)})`))
    .addColumn("grid_row", "integer", (c: any) => c.notNull())
    .addColumn("grid_col", "integer", (c: any) => c.notNull())
    .addColumn("row_span", "integer", (c: any) => c.notNull().defaultTo(1))
    .addColumn("col_span", "integer", (c: any) => c.notNull().defaultTo(1))
    .addColumn("circuit", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("sort_order", "integer", (c: any) => c.notNull().defaultTo(0))
    .execute();

  await stamps(site(id(db.schema.createTable("components"))))
    .addColumn("position_id", "uuid", (c: any) => c.notNull().references("positions.id").onDelete("cascade"))
    .addColumn("kind", "text", (c: any) => c.notNull().check(sql`kind IN (${list(KINDS)})`))
    .addColumn("maker", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("model", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("frame", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("mounting", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("rating_amps", "numeric")
    .addColumn("poles", "integer")
    .addColumn("voltage_rating", "integer")
    .addColumn("interrupting_ka", "numeric")
    .addColumn("serial", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("year", "integer")
    .addColumn("meter_range", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("lamp_watts", "numeric")
    .addColumn("heritage", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("original")
        .check(sql`heritage IN ('original', 'period', 'modern')`),
    )
    .addColumn("tag_number", "text")
    .addColumn("custody", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("in_place")
        .check(sql`custody IN (${list(CUSTODY)})`),
    )
    .addColumn("custody_location", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("disposition", "text", (c: any) => c.check(sql`disposition IN (${list(DISPOSITIONS)})`))
    .addColumn("disposition_reason", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("disposition_recommended", "text", (c: any) =>
      c.check(sql`disposition_recommended IN (${list(DISPOSITIONS)})`),
    )
    .addColumn("disposition_overridden", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("disposition_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("disposition_at", "timestamptz")
    .addColumn("retired_at", "timestamptz")
    .addColumn("notes", "text", (c: any) => c.notNull().defaultTo(""))
    .execute();

  await site(id(db.schema.createTable("inspections")))
    .addColumn("component_id", "uuid", (c: any) => c.notNull().references("components.id").onDelete("cascade"))
    .addColumn("position_id", "uuid", (c: any) => c.notNull().references("positions.id").onDelete("cascade"))
    .addColumn("inspector_id", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("inspected_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .addColumn("percent_rusted", "numeric")
    .addColumn("astm_grade", "integer", (c: any) => c.check(sql`astm_grade BETWEEN 0 AND 10`))
    .addColumn("iso_ri", "text")
    .addColumn("below_water_line", "boolean")
    .addColumn("contaminants", sql`text[]`, (c: any) => c.notNull().defaultTo(sql`'{}'::text[]`))
    .addColumn("mechanism", "text", (c: any) => c.check(sql`mechanism IN ('free', 'stiff', 'seized', 'not_tried')`))
    .addColumn("insulation", "text", (c: any) =>
      c.check(sql`insulation IN ('intact', 'tracking', 'charred', 'swollen')`),
    )
    .addColumn("notes", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await site(id(db.schema.createTable("custody_moves")))
    .addColumn("component_id", "uuid", (c: any) => c.notNull().references("components.id").onDelete("cascade"))
    .addColumn("from_state", "text", (c: any) => c.notNull())
    .addColumn("to_state", "text", (c: any) => c.notNull().check(sql`to_state IN (${list(CUSTODY)})`))
    .addColumn("location", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("note", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("moved_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("moved_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await site(id(db.schema.createTable("disposition_decisions")))
    .addColumn("component_id", "uuid", (c: any) => c.notNull().references("components.id").onDelete("cascade"))
    .addColumn("disposition", "text", (c: any) => c.notNull().check(sql`disposition IN (${list(DISPOSITIONS)})`))
    .addColumn("recommended", "text")
    .addColumn("overridden", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("reason", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("decided_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("decided_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .createTable("audit_log")
    .addColumn("id", "bigserial", (c: any) => c.primaryKey())
    .addColumn("site_id", "uuid", (c: any) => c.notNull().references("sites.id").onDelete("cascade"))
    .addColumn("entity_type", "text", (c: any) => c.notNull())
    .addColumn("entity_id", "uuid", (c: any) => c.notNull())
    .addColumn("board_id", "uuid")
    .addColumn("position_id", "uuid")
    .addColumn("action", "text", (c: any) => c.notNull())
    .addColumn("actor_id", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .addColumn("before", "jsonb")
    .addColumn("after", "jsonb")
    .execute();

  await stamps(site(id(db.schema.createTable("defects"))))
    .addColumn("board_id", "uuid", (c: any) => c.notNull().references("boards.id").onDelete("cascade"))
    .addColumn("section_id", "uuid", (c: any) => c.references("sections.id").onDelete("set null"))
    .addColumn("position_id", "uuid", (c: any) => c.references("positions.id").onDelete("set null"))
    .addColumn("component_id", "uuid", (c: any) => c.references("components.id").onDelete("set null"))
    .addColumn("inspection_id", "uuid", (c: any) => c.references("inspections.id").onDelete("set null"))
    .addColumn("title", "text", (c: any) => c.notNull())
    .addColumn("description", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("category", "text", (c: any) =>
      c
        .notNull()
        .check(
          sql`category IN ('corrosion', 'contamination', 'insulation', 'heat', 'mechanical', 'missing_part', 'wiring', 'enclosure', 'other')`,
        ),
    )
    .addColumn("severity", "text", (c: any) =>
      c.notNull().check(sql`severity IN ('cosmetic', 'degraded', 'impaired', 'disabling')`),
    )
    .addColumn("safety_critical", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("blocks_energisation", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("effort_hours", "numeric")
    .addColumn("cost_estimate", "numeric")
    .addColumn("parts_needed", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("parts_state", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("none_needed")
        .check(sql`parts_state IN ('none_needed', 'in_hand', 'wanted', 'unobtainable')`),
    )
    .addColumn("assignee_id", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("due_on", "date")
    .addColumn("status", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("open")
        .check(
          sql`status IN ('open', 'triaged', 'in_repair', 'awaiting_verification', 'closed', 'deferred', 'wont_fix')`,
        ),
    )
    .addColumn("status_reason", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("repaired_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("verified_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("closed_at", "timestamptz")
    .addColumn("created_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("priority_score", "numeric", (c: any) => c.notNull().defaultTo(0))
    .execute();

  await stamps(site(id(db.schema.createTable("photos"))))
    .addColumn("board_id", "uuid", (c: any) => c.references("boards.id").onDelete("set null"))
    .addColumn("position_id", "uuid", (c: any) => c.references("positions.id").onDelete("set null"))
    .addColumn("component_id", "uuid", (c: any) => c.references("components.id").onDelete("set null"))
    .addColumn("defect_id", "uuid", (c: any) => c.references("defects.id").onDelete("set null"))
    .addColumn("inspection_id", "uuid", (c: any) => c.references("inspections.id").onDelete("set null"))
    .addColumn("kind", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("other")
        .check(sql`kind IN ('as_found', 'nameplate', 'damage', 'during_work', 'after_work', 'thermal', 'other')`),
    )
    .addColumn("caption", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("original_name", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("format", "text", (c: any) => c.notNull())
    .addColumn("width", "integer", (c: any) => c.notNull())
    .addColumn("height", "integer", (c: any) => c.notNull())
    .addColumn("bytes", "integer", (c: any) => c.notNull())
    .addColumn("captured_at", "timestamptz")
    .addColumn("camera_model", "text", (c: any) => c.notNull().defaultTo(""))
    .addColumn("original_key", "text", (c: any) => c.notNull())
    .addColumn("display_key", "text", (c: any) => c.notNull())
    .addColumn("thumb_key", "text", (c: any) => c.notNull())
    .addColumn("uploaded_by", "uuid", (c: any) => c.references("users.id").onDelete("set null"))
    .addColumn("deleted_at", "timestamptz")
    .execute();

  // Every foreign key indexed; the partial and composite ones serve the common reads.
  const idx = async (name: string, table: string, cols: string[]) =>
    db.schema.createIndex(name).on(table).columns(cols).execute();
  await idx("flood_events_site_idx", "flood_events", ["site_id", "occurred_on"]);
  await idx("boards_site_idx", "boards", ["site_id"]);
  await idx("sections_board_idx", "sections", ["board_id", "sort_order"]);
  await idx("sections_site_idx", "sections", ["site_id"]);
  await idx("positions_board_idx", "positions", ["board_id", "grid_row", "grid_col"]);
  await idx("positions_section_idx", "positions", ["section_id"]);
  await idx("positions_site_idx", "positions", ["site_id"]);
  await sql`CREATE UNIQUE INDEX positions_board_designation_uq ON positions (board_id, lower(designation))`.execute(db);
  await idx("components_position_idx", "components", ["position_id"]);
  await idx("components_site_idx", "components", ["site_id", "kind"]);
  await idx("components_disposition_by_idx", "components", ["disposition_by"]);
  await sql`CREATE UNIQUE INDEX components_current_uq ON components (position_id) WHERE retired_at IS NULL`.execute(db);
  await sql`CREATE UNIQUE INDEX components_tag_uq ON components (site_id, lower(tag_number)) WHERE tag_number IS NOT NULL`.execute(
    db,
  );
  await idx("inspections_component_idx", "inspections", ["component_id", "inspected_at"]);
  await idx("inspections_position_idx", "inspections", ["position_id", "inspected_at"]);
  await idx("inspections_site_idx", "inspections", ["site_id", "inspected_at"]);
  await idx("inspections_inspector_idx", "inspections", ["inspector_id"]);
  await idx("custody_moves_component_idx", "custody_moves", ["component_id", "moved_at"]);
  await idx("custody_moves_site_idx", "custody_moves", ["site_id"]);
  await idx("custody_moves_by_idx", "custody_moves", ["moved_by"]);
  await idx("disposition_decisions_component_idx", "disposition_decisions", ["component_id", "decided_at"]);
  await idx("disposition_decisions_site_idx", "disposition_decisions", ["site_id"]);
  await idx("disposition_decisions_by_idx", "disposition_decisions", ["decided_by"]);
  await idx("audit_log_position_idx", "audit_log", ["position_id", "at"]);
  await idx("audit_log_entity_idx", "audit_log", ["entity_type", "entity_id", "at"]);
  await idx("audit_log_site_idx", "audit_log", ["site_id", "at"]);
  await idx("audit_log_actor_idx", "audit_log", ["actor_id"]);
  for (const col of [
    "board_id",
    "section_id",
    "position_id",
    "component_id",
    "inspection_id",
    "assignee_id",
    "repaired_by",
    "verified_by",
    "created_by",
  ])
    await idx(`defects_${col}_idx`, "defects", [col]);
  await idx("defects_site_status_idx", "defects", ["site_id", "status"]);
  await idx("defects_site_priority_idx", "defects", ["site_id", "priority_score", "created_at"]);
  for (const col of ["board_id", "position_id", "component_id", "defect_id", "inspection_id", "uploaded_by"])
    await idx(`photos_${col}_idx`, "photos", [col]);
  await idx("photos_site_idx", "photos", ["site_id", "created_at"]);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of [
    "photos",
    "defects",
    "audit_log",
    "disposition_decisions",
    "custody_moves",
    "inspections",
    "components",
    "positions",
    "sections",
    "boards",
    "flood_events",
  ])
    await db.schema.dropTable(t).execute();
}
