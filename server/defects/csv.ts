import type { Response } from "express";
import { sql, type RawBuilder } from "kysely";
import { escapeLiteral } from "pg";
import { to as copyTo } from "pg-copy-streams";
import { BOM, csvLines } from "../csv";
import { DEFECT_CATEGORY_LABELS, DEFECT_SEVERITY_LABELS, DEFECT_STATUS_LABELS } from "../../src/domain/vocab";
import { PARTS_STATE_LABELS, type ListQuery } from "../../src/schemas/defects";
import { poolOf, type Db } from "../db";
import { runSpooledExport, type ExportWriter } from "../export-stream";
import { localHeader } from "../../src/domain/local-time";
import { applyFilters, applySort, registerBase, registerCount } from "./list-repository";

const COLUMNS = [
  "Ref",
  "Title",
  "Board",
  "Section",
  "Position",
  "Category",
  "Severity",
  "Status",
  "Status reason",
  "Safety-critical",
  "Blocks energisation",
  "Effort (h)",
  "Cost estimate",
  "Parts needed",
  "Parts",
  "Assignee",
  "Due",
  "Priority points",
  "Pinned",
  "Raised",
  "Updated",
  "Description",
];

/** The header row: "Raised" and "Updated" are wall-clock times in the site's zone, named in their headers. */
export const csvHeader = (timeZone: string) =>
  COLUMNS.map((c) => (c === "Raised" || c === "Updated" ? localHeader(c, timeZone) : c));

/**
 * The stored columns the CSV's cells are made from, unformatted: what `npm run bench` has PostgreSQL
 * COPY as the baseline of the export (the same rows and order, none of the formatting).
 */
export const CSV_COLUMNS = [
  "d.ref",
  "d.title",
  "b.name as boardName",
  "s.name as sectionName",
  "p.designation",
  "d.category",
  "d.severity",
  "d.status",
  "d.statusReason",
  "d.safetyCritical",
  "d.blocksEnergisation",
  "d.effortHours",
  "d.costEstimate",
  "d.partsNeeded",
  "d.partsState",
  "a.name as assigneeName",
  "d.dueOn",
  "d.priorityScore",
  "pin.direction as pinned",
  "d.createdAt",
  "d.updatedAt",
  "d.description",
] as const;

/**
 * A text cell as every export writes it (server/csv.ts `guardCell`, the CSV-injection guard OWASP
 * describes): a leading single quote when it starts with = + - @, tab or carriage return. Empty and
 * missing text are NULL, which COPY writes as an empty, unquoted field (an empty string it would quote).
 */
const guarded = (v: RawBuilder<unknown>) =>
  sql<string>`nullif(CASE WHEN left(${v}, 1) IN ('=', '+', '-', '@', chr(9), chr(13)) THEN '''' || ${v} ELSE ${v} END, '')`;

/** A stored code as its label (the vocabulary the register shows); an unknown code is an empty field. */
const label = (v: RawBuilder<unknown>, labels: Record<string, string>) =>
  sql<string>`CASE ${v} ${sql.join(
    Object.entries(labels).map(([code, text]) => sql`WHEN ${code} THEN ${text}`),
    sql` `,
  )} END`;

const yesNo = (v: RawBuilder<unknown>) => sql<string>`CASE WHEN ${v} THEN 'yes' ELSE 'no' END`;
/** A number as JavaScript prints it for these columns: no trailing zeros after the point ("1.50" → "1.5"). */
const num = (v: RawBuilder<unknown>) => sql<string>`trim_scale(${v})::text`;
/**
 * "YYYY-MM-DD HH:mm:ss" in the site's zone, whole seconds (src/domain/local-time.ts `localDateTime`, which
 * the tests hold this to): PostgreSQL's copy of the IANA tz database through AT TIME ZONE.
 */
const local = (v: RawBuilder<unknown>, zone: string) =>
  sql<string>`to_char(${v} AT TIME ZONE ${zone}, 'YYYY-MM-DD HH24:MI:SS')`;

/** The CSV's 22 columns, each already the text the file holds, in COLUMNS' order. */
function csvSelection(zone: string) {
  const r = (c: string) => sql.ref(c);
  return [
    sql<string>`'D-' || d.ref`.as("c_ref"),
    guarded(r("d.title")).as("c_title"),
    guarded(r("b.name")).as("c_board"),
    guarded(r("s.name")).as("c_section"),
    guarded(r("p.designation")).as("c_position"),
    label(r("d.category"), DEFECT_CATEGORY_LABELS).as("c_category"),
    label(r("d.severity"), DEFECT_SEVERITY_LABELS).as("c_severity"),
    label(r("d.status"), DEFECT_STATUS_LABELS).as("c_status"),
    guarded(r("d.status_reason")).as("c_status_reason"),
    yesNo(r("d.safety_critical")).as("c_safety"),
    yesNo(r("d.blocks_energisation")).as("c_blocks"),
    num(r("d.effort_hours")).as("c_effort"),
    num(r("d.cost_estimate")).as("c_cost"),
    guarded(r("d.parts_needed")).as("c_parts_needed"),
    label(r("d.parts_state"), PARTS_STATE_LABELS).as("c_parts"),
    guarded(r("a.name")).as("c_assignee"),
    sql<string>`to_char(d.due_on, 'YYYY-MM-DD')`.as("c_due"),
    num(r("d.priority_score")).as("c_points"),
    r("pin.direction").as("c_pinned"),
    local(r("d.created_at"), zone).as("c_raised"),
    local(r("d.updated_at"), zone).as("c_updated"),
    guarded(r("d.description")).as("c_description"),
  ];
}

/**
 * COPY takes no parameters, so the compiled statement's `$n` placeholders become literals: each a
 * quoted string escaped by pg's own `escapeLiteral`, which is how pg sends every parameter anyway
 * (as text of no declared type, resolved by its context), so the statement means what it meant.
 * Quoted text in the statement ('…' and "…", as Kysely writes them) is left alone.
 */
export function inlineParameters(text: string, parameters: readonly unknown[]): string {
  const literal = (v: unknown) => {
    if (v === null || v === undefined) return "NULL";
    if (typeof v === "string") return escapeLiteral(v);
    if ((typeof v === "number" && Number.isFinite(v)) || typeof v === "bigint" || typeof v === "boolean")
      return escapeLiteral(String(v));
    throw new Error(`a parameter of type ${typeof v} cannot be written into a COPY statement`);
  };
  return text.replace(/'(?:[^']|'')*'|"(?:[^"]|"")*"|\$(\d+)/g, (m, n?: string) => {
    if (n === undefined) return m;
    const i = Number(n) - 1;
    if (i >= parameters.length) throw new Error(`no parameter $${n}`);
    return literal(parameters[i]);
  });
}

/**
 * COPY's CSV ends each record with LF; RFC 4180, and every other export here, with CRLF. This puts CR
 * before each LF that ends a record: one outside quotes (an LF inside a quoted field is the field's own
 * and stays as it is). A quote toggles the state, so a doubled quote inside a field leaves it unchanged.
 * In UTF-8 neither byte occurs inside a multi-byte character, so chunks may split text anywhere.
 */
export class CsvRecordEnds {
  private quoted = false;
  /** Records ended so far. */
  records = 0;

  convert(chunk: Buffer): Buffer {
    const ends: number[] = [];
    let quoted = this.quoted;
    let at = 0;
    let lf = chunk.indexOf(0x0a, at);
    for (;;) {
      if (quoted) {
        const close = chunk.indexOf(0x22, at);
        if (close < 0) break;
        quoted = false;
        at = close + 1;
        if (lf >= 0 && lf < at) lf = chunk.indexOf(0x0a, at);
        continue;
      }
      const open = chunk.indexOf(0x22, at);
      if (lf >= 0 && (open < 0 || lf < open)) {
        ends.push(lf);
        at = lf + 1;
        lf = chunk.indexOf(0x0a, at);
      } else if (open >= 0) {
        quoted = true;
        at = open + 1;
      } else break;
    }
    this.quoted = quoted;
    this.records += ends.length;
    if (!ends.length) return chunk;
    const out = Buffer.allocUnsafe(chunk.length + ends.length);
    let from = 0;
    let to = 0;
    for (const e of ends) {
      to += chunk.copy(out, to, from, e);
      out[to++] = 0x0d;
      from = e;
    }
    chunk.copy(out, to, from);
    return out;
  }
}

/** The read ran past its deadline: the same SQLSTATE PostgreSQL gives a cancelled statement (57014), so it answers 503. */
class CopyDeadline extends Error {
  readonly code = "57014";
  constructor(ms: number) {
    super(`the export's read took longer than the statement timeout (${ms} ms)`);
  }
}

/**
 * Streams the filtered register as RFC 4180 CSV (CRLF, quoted where needed), UTF-8 with a BOM so
 * spreadsheets pick the encoding. One sorted pass written by PostgreSQL's COPY into a temporary file
 * at the database's speed, the connection goes back to the pool, and only then is the file sent, at
 * the reader's pace (server/export-stream.ts `runSpooledExport`: write timeout, per-person cap, the
 * file deleted however the download ends), so a slow reader never holds a connection. The rows are
 * one snapshot: as the register read them at one moment. Times are the site's wall-clock time
 * ("YYYY-MM-DD HH:mm:ss", src/domain/local-time.ts), the zone in the header.
 */
export async function streamCsv(
  db: Db,
  siteId: string,
  timeZone: string,
  f: ListQuery,
  today: string,
  res: Response,
  filename: string,
) {
  await runSpooledExport(
    res,
    { "Content-Type": "text/csv; charset=utf-8", "Content-Disposition": `attachment; filename="${filename}"` },
    (out) => writeDefectsCsv(db, siteId, timeZone, f, today, out),
  );
}

/**
 * The register's CSV into any export writer (a spool file, or a file made by a background job): one
 * statement, the register's filters and order over the CSV's columns already formatted as text,
 * written by `COPY (…) TO STDOUT WITH (FORMAT csv)` (PostgreSQL quotes the fields; its plan may use
 * parallel workers, which a cursor's cannot) and passed on chunk by chunk through pg-copy-streams,
 * with CR added to each record's end. Node formats nothing per row. The statement holds one
 * connection of `db`'s pool until the writer has taken its last chunk, and never longer than the
 * pool's statement timeout (then it fails as a timed-out statement), so `out` must take chunks as
 * fast as they come (a file, never a socket). Any failure, the writer's included (the reader left),
 * ends the COPY and throws its connection away. `out.progress` hears records written of all
 * (counted first, only when someone listens).
 */
export async function writeDefectsCsv(
  db: Db,
  siteId: string,
  timeZone: string,
  f: ListQuery,
  today: string,
  out: ExportWriter,
) {
  const pool = poolOf(db);
  if (!pool) throw new Error("the defect CSV is written by COPY: it needs a Db made by createDb");
  const total = out.progress ? await registerCount(db, siteId, f, today) : undefined;
  out.progress?.(0, total);
  // The zone as Intl names it (src/domain/local-time.ts accepts "europe/lisbon" or "EST"); PostgreSQL knows the canonical names.
  const zone = new Intl.DateTimeFormat("en-GB", { timeZone }).resolvedOptions().timeZone;
  const q = applySort(applyFilters(registerBase(db, siteId), f, today, siteId), f.sort, f.dir)
    .select(csvSelection(zone))
    .compile();
  const statement = `COPY (${inlineParameters(q.sql, q.parameters)}) TO STDOUT WITH (FORMAT csv)`;
  const client = await pool.connect();
  let released = false;
  const release = (err?: Error) => {
    if (released) return;
    released = true;
    client.release(err);
  };
  const copy = client.query(copyTo(statement));
  let failed: Error | undefined;
  // Past the deadline the connection goes at once, whether PostgreSQL is still sending or the writer is still
  // taking the last chunk; the export fails as a timed-out statement when the writer returns.
  const limitMs = Number(pool.options.statement_timeout) || 0;
  const deadline = limitMs
    ? setTimeout(() => {
        failed = new CopyDeadline(limitMs);
        copy.destroy(failed);
        release(failed);
      }, limitMs)
    : undefined;
  const ends = new CsvRecordEnds();
  try {
    await out.write(BOM + csvLines([csvHeader(timeZone)]));
    for await (const chunk of copy) {
      await out.write(ends.convert(chunk as Buffer));
      if (failed) throw failed;
      out.progress?.(ends.records, Math.max(total ?? 0, ends.records));
    }
    if (failed) throw failed;
  } catch (e) {
    failed ??= e as Error;
    throw failed;
  } finally {
    clearTimeout(deadline);
    copy.on("error", () => {}); // a COPY ended early reports the closed connection too: nothing is left to hear it
    copy.destroy();
    // A COPY left mid-way leaves its connection inside the copy: it is closed, never reused.
    release(failed);
  }
}
