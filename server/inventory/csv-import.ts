/**
 * POST /inventory/import: papaparse reads the file, each row is checked with zod, then
 * against the rest of the file and the database (duplicate designations per board, two
 * positions on one grid cell, duplicate tag numbers per site, the grid of an existing
 * board). Unknown boards and
 * sections are created — the file is the crew's existing inventory, often of boards not
 * yet set up — and listed in the summary so the preview shows it. Preview writes nothing;
 * commit re-checks inside one transaction and writes all rows or none.
 */
import Papa from "papaparse";
import { sql } from "kysely";
import {
  CSV_EXPORT_EXTRA_COLUMNS,
  CSV_IMPORT_COLUMNS,
  type ImportResponse,
  type ImportRow,
} from "../../src/schemas/inventory";
import type { Db } from "../db";
import { AppError } from "../errors";
import { unguardCell } from "../csv";
import { csvRowSchema, toRecord, type ImportRecord } from "./csv-row";

interface Parsed {
  line: number;
  cells: Record<string, string>;
}
const REQUIRED = ["board", "designation", "kind", "grid_row", "grid_col"];
const key = (s: string) => s.trim().toLowerCase();

/** Rows with the line each starts on (a quoted cell may span lines, so lines are counted, not rows). */
export function parseCsv(text: string): { rows: Parsed[]; ignoredColumns: string[] } {
  const src = text.replace(/^\uFEFF/, "");
  const raw: { data: string[]; start: number }[] = [];
  let start = 0;
  Papa.parse<string[]>(src, {
    skipEmptyLines: false,
    step: (r) => {
      raw.push({ data: r.data, start });
      start = r.meta.cursor;
    },
  });
  if (!raw.length) throw new AppError(400, "invalid_input", "The file is empty.", { csv: "No header row" });
  const header = raw[0].data.map((h) => h.trim().toLowerCase().replace(/\s+/g, "_"));
  const missing = REQUIRED.filter((c) => !header.includes(c));
  if (missing.length)
    throw new AppError(400, "invalid_input", `The header row lacks: ${missing.join(", ")}.`, {
      csv: `Missing columns: ${missing.join(", ")}`,
    });
  const known = new Set<string>([...CSV_IMPORT_COLUMNS, ...CSV_EXPORT_EXTRA_COLUMNS]);
  const ignoredColumns = header.filter((h) => h && !known.has(h));
  let line = 1;
  let prevStart = 0;
  const rows: Parsed[] = [];
  for (const r of raw) {
    line += (src.slice(prevStart, r.start).match(/\r\n|\n|\r/g) ?? []).length;
    prevStart = r.start;
    if (r === raw[0] || r.data.every((c) => c.trim() === "")) continue;
    const cells: Record<string, string> = {};
    header.forEach((h, i) => {
      if ((CSV_IMPORT_COLUMNS as readonly string[]).includes(h)) cells[h] = unguardCell(r.data[i] ?? "");
    });
    rows.push({ line, cells });
  }
  return { rows, ignoredColumns };
}

async function siteState(db: Db, siteId: string) {
  const boards = await db
    .selectFrom("boards")
    .select(["id", "name", "gridRows", "gridCols"])
    .where("siteId", "=", siteId)
    .execute();
  const sections = await db
    .selectFrom("sections")
    .select(["id", "boardId", "name"])
    .where("siteId", "=", siteId)
    .execute();
  const designations = await db
    .selectFrom("positions")
    .select([
      "boardId",
      "designation",
      sql<string>`lower(designation)`.as("d"),
      "gridRow",
      "gridCol",
      "rowSpan",
      "colSpan",
    ])
    .where("siteId", "=", siteId)
    .execute();
  const cells = new Map<string, string>();
  for (const p of designations) for (const c of cellsOf(p.boardId, p)) cells.set(c, p.designation);
  const tags = await db
    .selectFrom("components")
    .select(sql<string>`lower(tag_number)`.as("t"))
    .where("siteId", "=", siteId)
    .where("tagNumber", "is not", null)
    .execute();
  return {
    boards: new Map(boards.map((b) => [key(b.name), b])),
    sections: new Set(sections.map((s) => `${s.boardId}|${key(s.name)}`)),
    sectionIds: new Map(sections.map((s) => [`${s.boardId}|${key(s.name)}`, s.id])),
    designations: new Set(designations.map((d) => `${d.boardId}|${d.d}`)),
    /** "boardId|row|col" → the designation covering that grid cell. */
    cells,
    tags: new Set(tags.map((t) => t.t)),
  };
}
/** Every grid cell a position covers, span included. */
function cellsOf(boardKey: string, p: { gridRow: number; gridCol: number; rowSpan: number; colSpan: number }) {
  const out: string[] = [];
  for (let r = p.gridRow; r < p.gridRow + p.rowSpan; r++)
    for (let c = p.gridCol; c < p.gridCol + p.colSpan; c++) out.push(`${boardKey}|${r}|${c}`);
  return out;
}

/** A row whose cells another position already covers (in the database or earlier in the file). */
function overlapError(cells: Map<string, string>, boardKey: string, rec: ImportRecord, line: number) {
  const mine = cellsOf(boardKey, rec);
  const hit = mine.map((c) => cells.get(c)).find((x) => x !== undefined);
  if (hit === undefined) for (const c of mine) cells.set(c, `${rec.designation} (line ${line})`);
  return hit === undefined ? null : `That grid cell is taken by ${hit}`;
}

export type SiteState = Awaited<ReturnType<typeof siteState>>;

/** The checks of a row against the database and the rows above it; remembers what it has seen. */
class CrossCheck {
  private seenDesignation = new Map<string, number>();
  private seenTag = new Map<string, number>();
  boardsToCreate = new Map<string, string>();
  sectionsToCreate = new Set<string>();
  constructor(private state: SiteState) {}

  check(rec: ImportRecord, line: number, errors: Record<string, string>) {
    const board = this.state.boards.get(key(rec.board));
    const boardKey = board?.id ?? `new:${key(rec.board)}`;
    const dKey = `${boardKey}|${key(rec.designation)}`;
    if (this.seenDesignation.has(dKey))
      errors.designation = `Also on line ${this.seenDesignation.get(dKey)} for this board`;
    else if (this.state.designations.has(dKey)) errors.designation = "Already on this board";
    if (!this.seenDesignation.has(dKey)) this.seenDesignation.set(dKey, line);
    if (rec.tagNumber) {
      const t = key(rec.tagNumber);
      if (this.seenTag.has(t)) errors.tag_number = `Also on line ${this.seenTag.get(t)}`;
      else if (this.state.tags.has(t)) errors.tag_number = "Already on a component of this site";
      if (!this.seenTag.has(t)) this.seenTag.set(t, line);
    }
    if (board && rec.gridRow + rec.rowSpan - 1 > board.gridRows)
      errors.grid_row = `The board has ${board.gridRows} rows`;
    if (board && rec.gridCol + rec.colSpan - 1 > board.gridCols)
      errors.grid_col = `The board has ${board.gridCols} columns`;
    const overlap = Object.keys(errors).length ? null : overlapError(this.state.cells, boardKey, rec, line);
    if (overlap) errors.grid_col = overlap;
    // A board named in two spellings of case is one board: keep the first spelling.
    if (!board && !this.boardsToCreate.has(key(rec.board))) this.boardsToCreate.set(key(rec.board), rec.board);
    if (rec.section && !this.state.sections.has(`${boardKey}|${key(rec.section)}`))
      this.sectionsToCreate.add(`${rec.board} / ${rec.section}`);
  }
}

/** Checks every row; `records` holds the good ones in file order. */
export async function validateImport(db: Db, siteId: string, text: string) {
  const { rows: parsed, ignoredColumns } = parseCsv(text);
  const state = await siteState(db, siteId);
  const cross = new CrossCheck(state);
  const rows: ImportRow[] = [];
  const records: ImportRecord[] = [];
  for (const p of parsed) {
    const res = csvRowSchema.safeParse(p.cells);
    const errors: Record<string, string> = {};
    if (!res.success) for (const i of res.error.issues) errors[String(i.path[0] ?? "_")] ??= i.message;
    const rec = res.success ? toRecord(res.data) : null;
    if (rec) cross.check(rec, p.line, errors);
    const ok = Object.keys(errors).length === 0;
    rows.push({ line: p.line, ok, errors, data: rec });
    if (ok && rec) records.push(rec);
  }
  const failed = rows.filter((r) => !r.ok).length;
  const summary = {
    rows: rows.length,
    ok: rows.length - failed,
    failed,
    boardsToCreate: [...cross.boardsToCreate.values()],
    sectionsToCreate: [...cross.sectionsToCreate],
    ignoredColumns,
    committed: false,
  };
  const response: ImportResponse = { rows, summary };
  return { response, records, state };
}
