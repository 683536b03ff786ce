import { Kysely, sql } from "kysely";

// The parts wanted list: lines aggregated by specification, the demand links
// that tie them to components and defects, leads, acquisitions, a line history and the
// public share links. Frozen in time: never import app code here.

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
const STATUSES = ["wanted", "lead_found", "acquired", "received", "fitted", "cancelled"];
const RULES = ["original_only", "period_ok", "modern_ok"];
const LEAD_KINDS = ["donor", "dealer", "collector", "salvage", "other"];
const LEAD_STATUSES = ["open", "chasing", "secured", "dead"];

export async function up(db: Kysely<any>): Promise<void> {
  const id = (t: any) => t.addColumn("id", "uuid", (c: any) => c.primaryKey().defaultTo(sql`gen_random_uuid()`));
  const site = (t: any) =>
    t.addColumn("site_id", "uuid", (c: any) => c.notNull().references("sites.id").onDelete("cascade"));
  const stamps = (t: any) =>
    t
      .addColumn("version", "integer", (c: any) => c.notNull().defaultTo(1))
      .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
      .addColumn("updated_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`));
  const text = (name: string) => (t: any) => t.addColumn(name, "text", (c: any) => c.notNull().defaultTo(""));
  const user = (name: string) => (t: any) =>
    t.addColumn(name, "uuid", (c: any) => c.references("users.id").onDelete("set null"));

  let lines = stamps(site(id(db.schema.createTable("part_lines"))))
    .addColumn("origin", "text", (c: any) => c.notNull().check(sql`origin IN ('register', 'manual')`))
    .addColumn("kind", "text", (c: any) => c.notNull().check(sql`kind IN (${list(KINDS)})`))
    .addColumn("rating_amps", "numeric", (c: any) => c.check(sql`rating_amps > 0`))
    .addColumn("poles", "integer", (c: any) => c.check(sql`poles >= 1`))
    .addColumn("voltage_rating", "integer", (c: any) => c.check(sql`voltage_rating > 0`));
  for (const col of ["frame", "mounting", "maker", "model", "need", "notes", "cancel_reason"]) lines = text(col)(lines);
  await user("created_by")(lines)
    .addColumn("must_match", sql`text[]`)
    .addColumn("spec_key", "text", (c: any) => c.notNull())
    .addColumn("heritage_rule", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("original_only")
        .check(sql`heritage_rule IN (${list(RULES)})`),
    )
    .addColumn("status", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("wanted")
        .check(sql`status IN (${list(STATUSES)})`),
    )
    .addColumn("auto_cancelled", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("manual_qty", "integer", (c: any) =>
      c
        .notNull()
        .defaultTo(0)
        .check(sql`manual_qty >= 0`),
    )
    .addColumn("estimated_unit_cost", "numeric", (c: any) => c.check(sql`estimated_unit_cost >= 0`))
    .addColumn("fitted_at", "timestamptz")
    .execute();

  await site(id(db.schema.createTable("part_demand_links")))
    .addColumn("line_id", "uuid", (c: any) => c.notNull().references("part_lines.id").onDelete("cascade"))
    .addColumn("component_id", "uuid", (c: any) => c.references("components.id").onDelete("cascade"))
    .addColumn("defect_id", "uuid", (c: any) => c.references("defects.id").onDelete("cascade"))
    .addColumn("position_id", "uuid", (c: any) => c.references("positions.id").onDelete("set null"))
    .addColumn("board_id", "uuid", (c: any) => c.references("boards.id").onDelete("set null"))
    .addColumn("qty", "integer", (c: any) =>
      c
        .notNull()
        .defaultTo(1)
        .check(sql`qty >= 0`),
    )
    .addColumn("active", "boolean", (c: any) => c.notNull().defaultTo(true))
    .addColumn("fitted", "boolean", (c: any) => c.notNull().defaultTo(false))
    .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .addColumn("withdrawn_at", "timestamptz")
    .addColumn("fitted_at", "timestamptz")
    .addCheckConstraint("part_demand_links_one_source", sql`(component_id IS NULL) <> (defect_id IS NULL)`)
    .execute();

  let leads = stamps(site(id(db.schema.createTable("part_leads"))))
    .addColumn("line_id", "uuid", (c: any) => c.notNull().references("part_lines.id").onDelete("cascade"))
    .addColumn("source_kind", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("other")
        .check(sql`source_kind IN (${list(LEAD_KINDS)})`),
    )
    .addColumn("source", "text", (c: any) => c.notNull());
  for (const col of ["contact", "notes"]) leads = text(col)(leads);
  await user("created_by")(leads)
    .addColumn("asking_price", "numeric", (c: any) => c.check(sql`asking_price >= 0`))
    .addColumn("qty_offered", "integer", (c: any) => c.check(sql`qty_offered >= 1`))
    .addColumn("status", "text", (c: any) =>
      c
        .notNull()
        .defaultTo("open")
        .check(sql`status IN (${list(LEAD_STATUSES)})`),
    )
    .execute();

  await user("recorded_by")(text("notes")(site(id(db.schema.createTable("part_acquisitions")))))
    .addColumn("line_id", "uuid", (c: any) => c.notNull().references("part_lines.id").onDelete("cascade"))
    .addColumn("lead_id", "uuid", (c: any) => c.references("part_leads.id").onDelete("set null"))
    .addColumn("qty", "integer", (c: any) => c.notNull().check(sql`qty >= 1`))
    .addColumn("cost", "numeric", (c: any) => c.notNull().check(sql`cost >= 0`))
    .addColumn("acquired_on", "date", (c: any) => c.notNull())
    .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await user("actor_id")(text("summary")(site(db.schema.createTable("part_line_history"))))
    .addColumn("id", "bigserial", (c: any) => c.primaryKey())
    .addColumn("line_id", "uuid", (c: any) => c.notNull().references("part_lines.id").onDelete("cascade"))
    .addColumn("action", "text", (c: any) => c.notNull())
    .addColumn("from_status", "text")
    .addColumn("to_status", "text")
    .addColumn("at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await user("revoked_by")(user("created_by")(text("label")(site(id(db.schema.createTable("part_share_links"))))))
    .addColumn("token_hash", "text", (c: any) => c.notNull().unique())
    .addColumn("created_at", "timestamptz", (c: any) => c.notNull().defaultTo(sql`now()`))
    .addColumn("revoked_at", "timestamptz")
    .execute();

  const idx = async (name: string, table: string, cols: string[]) =>
    db.schema.createIndex(name).on(table).columns(cols).execute();
  await idx("part_lines_site_status_idx", "part_lines", ["site_id", "status"]);
  await idx("part_lines_site_key_idx", "part_lines", ["site_id", "spec_key"]);
  await idx("part_lines_site_kind_idx", "part_lines", ["site_id", "kind"]);
  await idx("part_lines_site_rule_idx", "part_lines", ["site_id", "heritage_rule"]);
  await idx("part_lines_created_by_idx", "part_lines", ["created_by"]);
  for (const col of ["line_id", "component_id", "defect_id", "position_id", "board_id", "site_id"])
    await idx(`part_demand_links_${col}_idx`, "part_demand_links", [col]);
  for (const col of ["line_id", "site_id", "created_by"]) await idx(`part_leads_${col}_idx`, "part_leads", [col]);
  for (const col of ["line_id", "lead_id", "site_id", "recorded_by"])
    await idx(`part_acquisitions_${col}_idx`, "part_acquisitions", [col]);
  await idx("part_line_history_line_idx", "part_line_history", ["line_id", "at"]);
  for (const col of ["site_id", "actor_id"]) await idx(`part_line_history_${col}_idx`, "part_line_history", [col]);
  for (const col of ["site_id", "created_by", "revoked_by"])
    await idx(`part_share_links_${col}_idx`, "part_share_links", [col]);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of [
    "part_share_links",
    "part_line_history",
    "part_acquisitions",
    "part_leads",
    "part_demand_links",
    "part_lines",
  ])
    await db.schema.dropTable(t).execute();
}
