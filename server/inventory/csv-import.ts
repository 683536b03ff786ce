/**
 * POST /inventory/import: papaparse reads the file, each row is checked with zod, then
 * against the rest of the file and the database (duplicate designations per board,
 * duplicate tag numbers per site, the grid of an existing board). Unknown boards and
 * sections are created — the file is the crew's existing inventory, often of boards not
 * yet set up — and listed in the summary so the preview shows it. Preview writes nothing;
 * commit re-checks inside one transaction and writes all rows or none.
 */
import Papa from "papaparse";
import { sql } from "kysely";
import { CSV_EXPORT_EXTRA_COLUMNS, CSV_IMPORT_COLUMNS, type ImportResponse, type ImportRow } from "../../src/schemas/inventory";
import type { Db } from "../db";
import { AppError } from "../errors";
import { csvRowSchema, toRecord, unguardCell, type ImportRecord } from "./csv-row";

interface Parsed { line: number; cells: Record<string, string> }
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
  if (missing.length) throw new AppError(400, "invalid_input", `The header row lacks: ${missing.join(", ")}.`, { csv: `Missing columns: ${missing.join(", ")}` });
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
    header.forEach((h, i) => { if ((CSV_IMPORT_COLUMNS as readonly string[]).includes(h)) cells[h] = unguardCell(r.data[i] ?? ""); });
    rows.push({ line, cells });
  }
  return { rows, ignoredColumns };
}

async function siteState(db: Db, siteId: string) {
  const boards = await db.selectFrom("boards").select(["id", "name", "gridRows", "gridCols"]).where("siteId", "=", siteId).execute();
  const sections = await db.selectFrom("sections").select(["id", "boardId", "name"]).where("siteId", "=", siteId).execute();
  const designations = await db.selectFrom("positions").select(["boardId", sql<string>`lower(designation)`.as("d")]).where("siteId", "=", siteId).execute();
  const tags = await db.selectFrom("components").select(sql<string>`lower(tag_number)`.as("t")).where("siteId", "=", siteId).where("tagNumber", "is not", null).execute();
  return {
    boards: new Map(boards.map((b) => [key(b.name), b])),
    sections: new Set(sections.map((s) => `${s.boardId}|${key(s.name)}`)),
    sectionIds: new Map(sections.map((s) => [`${s.boardId}|${key(s.name)}`, s.id])),
    designations: new Set(designations.map((d) => `${d.boardId}|${d.d}`)),
    tags: new Set(tags.map((t) => t.t)),
  };
}
export type SiteState = Awaited<ReturnType<typeof siteState>>;

/** Checks every row; `records` holds the good ones in file order. */
export async function validateImport(db: Db, siteId: string, text: string) {
  const { rows: parsed, ignoredColumns } = parseCsv(text);
  const state = await siteState(db, siteId);
  const seenDesignation = new Map<string, number>();
  const seenTag = new Map<string, number>();
  const boardsToCreate = new Set<string>();
  const sectionsToCreate = new Set<string>();
  const rows: ImportRow[] = [];
  const records: ImportRecord[] = [];
  for (const p of parsed) {
    const res = csvRowSchema.safeParse(p.cells);
    const errors: Record<string, string> = {};
    if (!res.success) for (const i of res.error.issues) errors[String(i.path[0] ?? "_")] ??= i.message;
    const rec = res.success ? toRecord(res.data) : null;
    if (rec) {
      const board = state.boards.get(key(rec.board));
      const boardKey = board?.id ?? `new:${key(rec.board)}`;
      const dKey = `${boardKey}|${key(rec.designation)}`;
      if (seenDesignation.has(dKey)) errors.designation = `Also on line ${seenDesignation.get(dKey)} for this board`;
      else if (state.designations.has(dKey)) errors.designation = "Already on this board";
      seenDesignation.set(dKey, seenDesignation.get(dKey) ?? p.line);
      if (rec.tagNumber) {
        const t = key(rec.tagNumber);
        if (seenTag.has(t)) errors.tag_number = `Also on line ${seenTag.get(t)}`;
        else if (state.tags.has(t)) errors.tag_number = "Already on a component of this site";
        seenTag.set(t, seenTag.get(t) ?? p.line);
      }
      if (board && rec.gridRow + rec.rowSpan - 1 > board.gridRows) errors.grid_row = `The board has ${board.gridRows} rows`;
      if (board && rec.gridCol + rec.colSpan - 1 > board.gridCols) errors.grid_col = `The board has ${board.gridCols} columns`;
      if (!board) boardsToCreate.add(rec.board);
      if (rec.section && !state.sections.has(`${boardKey}|${key(rec.section)}`)) sectionsToCreate.add(`${rec.board} / ${rec.section}`);
    }
    const ok = Object.keys(errors).length === 0;
    rows.push({ line: p.line, ok, errors, data: rec });
    if (ok && rec) records.push(rec);
  }
  // A board named in two spellings of case is one board: keep the first spelling.
  const uniqueBoards = [...new Map([...boardsToCreate].map((b) => [key(b), b])).values()];
  const failed = rows.filter((r) => !r.ok).length;
  const response: ImportResponse = {
    rows,
    summary: { rows: rows.length, ok: rows.length - failed, failed, boardsToCreate: uniqueBoards, sectionsToCreate: [...sectionsToCreate], ignoredColumns, committed: false },
  };
  return { response, records, state };
}
