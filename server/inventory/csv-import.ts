/**
 * POST /inventory/import: the crew's spreadsheet, read as it was saved (encoding and
 * separator detected and reported, server/csv-read.ts), each row checked with zod, then
 * matched to an existing position — by the export's position_id, else board + designation,
 * else tag number — and planned as create / update (old → new per column) / unchanged /
 * problem. Checks run on the inventory as it would be after the import (designations per
 * board, tag numbers per site, one position per grid cell, the grid of an existing board),
 * so two rows may swap cells. Unknown boards and sections are created and listed. Custody and
 * disposition are never applied by a file: a row that changes them lists them as ignored.
 * Preview writes nothing; commit re-plans inside one transaction and writes all or nothing.
 */
import { createHash } from "node:crypto";
import Papa from "papaparse";
import {
  CSV_EXPORT_EXTRA_COLUMNS,
  CSV_IMPORT_COLUMNS,
  CSV_KEY_COLUMNS,
  CSV_NOT_APPLIED_COLUMNS,
  type ImportAction,
  type ImportResponse,
  type ImportRow,
} from "../../src/schemas/inventory";
import * as repo from "./csv-repository";
import type { Db } from "../db";
import { AppError } from "../errors";
import { readTextCell } from "../csv";
import { guessSeparator, type DecodedText } from "../csv-read";
import { csvRowSchema, toRecord, type ImportRecord } from "./csv-row";

interface Parsed {
  line: number;
  cells: Record<string, string>;
}
const REQUIRED = ["board", "designation", "kind", "grid_row", "grid_col"];
const key = (s: string) => s.trim().toLowerCase();
/** "Latest inspected at (America/Halifax)" → latest_inspected_at: the zone note is the export's, not the name. */
export const normaliseHeader = (h: string) =>
  h
    .replace(/^\uFEFF/, "")
    .trim()
    .toLowerCase()
    .replace(/\s*\([^)]*\)\s*$/, "")
    .replace(/\s+/g, "_");

const KNOWN = new Set<string>([...CSV_KEY_COLUMNS, ...CSV_IMPORT_COLUMNS, ...CSV_EXPORT_EXTRA_COLUMNS]);

/**
 * Rows one import takes: a board holds at most 60 × 60 = 3,600 positions, so this is a few
 * boards' worth; a bigger file is refused whole (413, nothing read into the plan, nothing written)
 * with the advice to split it by board. `IMPORT_MAX_ROWS` in the environment changes it.
 */
export const importMaxRows = () => Number(process.env.IMPORT_MAX_ROWS ?? 10_000);
/** Rows the answer lists (problems, then changes, then new, then unchanged); the summary counts them all. */
export const ANSWER_ROWS = 1_000;

/** Rows with the line each starts on (a quoted cell may span lines, so lines are counted, not rows). */
export function parseCsv(decoded: DecodedText) {
  const src = decoded.text.replace(/^\uFEFF/, "");
  const separator = guessSeparator(src);
  const raw: { data: string[]; start: number }[] = [];
  const max = importMaxRows();
  let start = 0;
  let tooMany = false;
  let filled = 0; // rows with any text, the header included
  Papa.parse<string[]>(src, {
    delimiter: separator,
    skipEmptyLines: false,
    step: (r, parser) => {
      raw.push({ data: r.data, start });
      start = r.meta.cursor;
      if (r.data.some((c) => c.trim() !== "") && ++filled > max + 1) {
        tooMany = true;
        parser.abort();
      }
    },
  });
  if (tooMany)
    throw new AppError(
      413,
      "too_many_rows",
      `The file has more than ${max.toLocaleString("en")} rows; one import takes at most ${max.toLocaleString("en")}. Nothing was read or changed: split the file by board and import each part.`,
      { csv: `More than ${max} rows` },
    );
  if (!raw.length || raw[0].data.every((h) => !h.trim()))
    throw new AppError(400, "invalid_input", "The file is empty.", { csv: "No header row" });
  const header = raw[0].data.map(normaliseHeader);
  const missing = REQUIRED.filter((c) => !header.includes(c));
  if (missing.length)
    throw new AppError(
      400,
      "invalid_input",
      `The header row lacks: ${missing.join(", ")} (read as ${decoded.encoding}, cells separated by ${separatorName(separator)}).`,
      { csv: `Missing columns: ${missing.join(", ")}` },
    );
  const ignoredColumns = header.filter((h) => h && !KNOWN.has(h));
  let line = 1;
  let prevStart = 0;
  const rows: Parsed[] = [];
  for (const r of raw) {
    line += (src.slice(prevStart, r.start).match(/\r\n|\n|\r/g) ?? []).length;
    prevStart = r.start;
    if (r === raw[0] || r.data.every((c) => c.trim() === "")) continue;
    const cells: Record<string, string> = {};
    header.forEach((h, i) => {
      if (KNOWN.has(h)) cells[h] = readTextCell(r.data[i] ?? "");
    });
    rows.push({ line, cells });
  }
  return { rows, ignoredColumns, separator, columns: header.filter(Boolean) };
}

export const separatorName = (s: string) =>
  s === "," ? "commas" : s === ";" ? "semicolons" : s === "\t" ? "tabs" : s === "|" ? "vertical bars" : s;

const loadPositions = repo.importPositions;
export type CurrentPosition = Awaited<ReturnType<typeof loadPositions>>[number];

/** The site's inventory as an import is planned against (on the caller's connection or transaction). */
export async function siteState(db: Db, siteId: string) {
  const boards = await repo.importBoards(db, siteId);
  const sections = await repo.importSections(db, siteId);
  const positions = await loadPositions(db, siteId);
  const tags = await repo.importTags(db, siteId);
  return {
    boards: new Map(boards.map((b) => [key(b.name), b])),
    sections: new Set(sections.map((s) => `${s.boardId}|${key(s.name)}`)),
    sectionIds: new Map(sections.map((s) => [`${s.boardId}|${key(s.name)}`, s.id])),
    positions: new Map(positions.map((p) => [p.id, p])),
    byDesignation: new Map(positions.map((p) => [`${p.boardId}|${key(p.designation)}`, p])),
    /** Tag (lower case) → the component holding it, retired ones too: the unique index covers them. */
    tags: new Map(tags.map((t) => [key(t.tagNumber!), t])),
  };
}
export type SiteState = Awaited<ReturnType<typeof siteState>>;

/** Position columns and component columns of the file, in the order the preview lists changes. */
const POSITION_FIELDS = [
  ["section", "section"],
  ["designation", "designation"],
  ["kind", "kind"],
  ["grid_row", "gridRow"],
  ["grid_col", "gridCol"],
  ["row_span", "rowSpan"],
  ["col_span", "colSpan"],
  ["circuit", "circuit"],
] as const;
const COMPONENT_FIELDS = [
  ["maker", "maker"],
  ["model", "model"],
  ["frame", "frame"],
  ["mounting", "mounting"],
  ["rating_amps", "ratingAmps"],
  ["poles", "poles"],
  ["voltage_rating", "voltageRating"],
  ["interrupting_ka", "interruptingKa"],
  ["serial", "serial"],
  ["year", "year"],
  ["meter_range", "meterRange"],
  ["lamp_watts", "lampWatts"],
  ["heritage", "heritage"],
  ["tag_number", "tagNumber"],
  ["notes", "notes"],
] as const;
type PositionField = (typeof POSITION_FIELDS)[number][1];
type ComponentField = (typeof COMPONENT_FIELDS)[number][1];

const show = (v: unknown) => (v === null || v === undefined ? "" : String(v));
/** Text as compared: line endings and surrounding blanks a spreadsheet adds or drops do not count. */
const norm = (v: unknown) =>
  typeof v === "string" ? v.replace(/\r\n?/g, "\n").trim() : v === undefined || v === null ? "" : v;
const same = (a: unknown, b: unknown) => norm(a) === norm(b);

export interface PlannedRow {
  row: ImportRow;
  record: ImportRecord | null;
  current: CurrentPosition | null;
  positionPatch: Partial<Record<PositionField, unknown>>;
  componentPatch: Partial<Record<ComponentField, unknown>>;
}

const versionOf = (p: CurrentPosition) => `p${p.version}${p.componentId ? `c${p.componentVersion}` : ""}`;

/** Which existing position a row is about: its id, else board + designation, else its tag on that board. */
function match(
  state: SiteState,
  p: Parsed,
  rec: ImportRecord | null,
  errors: Record<string, string>,
): { current: CurrentPosition | null; by: "id" | "designation" | "tag" | null; note?: string } {
  const id = (p.cells.position_id ?? "").trim();
  if (id) {
    const hit = state.positions.get(id.toLowerCase());
    if (hit) return { current: hit, by: "id" };
    if (!/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id)) {
      errors.position_id = "Not an id from a Tideline export: leave it as exported, or empty for a new position";
      return { current: null, by: null };
    }
    // An id from another site's export (a copy of a board set): matched by name below, or new.
  }
  if (!rec) return { current: null, by: null };
  const board = state.boards.get(key(rec.board));
  if (board) {
    const hit = state.byDesignation.get(`${board.id}|${key(rec.designation)}`);
    if (hit) return { current: hit, by: "designation" };
  }
  if (rec.tagNumber) {
    const t = state.tags.get(key(rec.tagNumber));
    const hit = t ? state.positions.get(t.positionId) : undefined;
    if (hit && board && hit.boardId === board.id) return { current: hit, by: "tag" };
  }
  return { current: null, by: null };
}

/** The row's record applied over the current position: columns the file lacks, and blank spans and heritage, keep their value. */
function diffRow(p: Parsed, rec: ImportRecord, cur: CurrentPosition) {
  const has = (col: string) => col in p.cells;
  const changes: ImportRow["changes"] = [];
  const positionPatch: PlannedRow["positionPatch"] = {};
  const componentPatch: PlannedRow["componentPatch"] = {};
  for (const [col, field] of POSITION_FIELDS) {
    if (!has(col)) continue;
    if ((col === "row_span" || col === "col_span") && !p.cells[col].trim()) continue;
    const from = field === "section" ? cur.section : cur[field];
    const to = rec[field];
    if (same(from, to)) continue;
    changes.push({ column: col, from: show(from), to: show(to) });
    positionPatch[field] = to;
  }
  for (const [col, field] of COMPONENT_FIELDS) {
    if (!has(col)) continue;
    if (col === "heritage" && !p.cells[col].trim()) continue;
    const from = cur.componentId ? cur[field] : null;
    const to = rec[field];
    if (same(from, to) || (!cur.componentId && (to === "" || to === null))) continue;
    changes.push({ column: col, from: show(from), to: show(to) });
    componentPatch[field] = to;
  }
  return { changes, positionPatch, componentPatch };
}

const NOT_APPLIED_WHY: Record<(typeof CSV_NOT_APPLIED_COLUMNS)[number], string> = {
  custody: "Custody moves are recorded on the position (who moved it, where, when): not applied by an import",
  custody_location: "Custody moves are recorded on the position (who moved it, where, when): not applied by an import",
  disposition:
    "The curator decides dispositions on the board, with the recommendation and a reason: not applied by an import",
  disposition_overridden: "Follows from the disposition decided on the board: not applied by an import",
};
const CUSTODY_DEFAULT: Record<string, string> = {
  custody: "in_place",
  custody_location: "",
  disposition: "",
  disposition_overridden: "no",
};

function ignoredOf(p: Parsed, cur: CurrentPosition | null): ImportRow["ignored"] {
  const out: ImportRow["ignored"] = [];
  for (const col of CSV_NOT_APPLIED_COLUMNS) {
    if (!(col in p.cells)) continue;
    const to = p.cells[col].trim();
    const from = cur
      ? show(
          col === "custody"
            ? cur.custody
            : col === "custody_location"
              ? cur.custodyLocation
              : col === "disposition"
                ? cur.disposition
                : cur.dispositionOverridden === null
                  ? ""
                  : cur.dispositionOverridden
                    ? "yes"
                    : "no",
        )
      : CUSTODY_DEFAULT[col];
    if (!same(from, to) && !(cur === null && to === "")) out.push({ column: col, from, to, why: NOT_APPLIED_WHY[col] });
  }
  return out;
}

/** Every grid cell a position covers, span included. */
function cellsOf(boardKey: string, p: { gridRow: number; gridCol: number; rowSpan: number; colSpan: number }) {
  const out: string[] = [];
  for (let r = p.gridRow; r < p.gridRow + p.rowSpan; r++)
    for (let c = p.gridCol; c < p.gridCol + p.colSpan; c++) out.push(`${boardKey}|${r}|${c}`);
  return out;
}

/**
 * The rows an answer lists: all of them up to ANSWER_ROWS, else problems first, then changes,
 * new rows and unchanged ones, in file order; `summary.shown` says how many are listed.
 */
export function answerOf(r: ImportResponse): ImportResponse {
  if (r.rows.length <= ANSWER_ROWS) return { rows: r.rows, summary: { ...r.summary, shown: r.rows.length } };
  const order: ImportAction[] = ["problem", "update", "create", "unchanged"];
  const picked = order
    .flatMap((a) => r.rows.filter((x) => x.action === a))
    .slice(0, ANSWER_ROWS)
    .sort((a, b) => a.line - b.line);
  return { rows: picked, summary: { ...r.summary, shown: picked.length } };
}

/** Checks every row; plans each; the digest covers the plan and the versions it was made against. Pure: no I/O. */
export function planImport(decoded: DecodedText, state: SiteState) {
  const { rows: parsed, ignoredColumns, separator, columns } = parseCsv(decoded);
  const planned: PlannedRow[] = [];
  const claimed = new Map<string, number>(); // position id → line of the row that matched it
  const boardsToCreate = new Map<string, string>();
  const sectionsToCreate = new Set<string>();

  for (const p of parsed) {
    const res = csvRowSchema.safeParse(p.cells);
    const errors: Record<string, string> = {};
    if (!res.success) for (const i of res.error.issues) errors[String(i.path[0] ?? "_")] ??= i.message;
    const rec = res.success ? toRecord(res.data) : null;
    const m = match(state, p, rec, errors);
    let cur = m.current;
    if (cur && claimed.has(cur.id)) {
      errors[m.by === "id" ? "position_id" : "designation"] =
        `Line ${claimed.get(cur.id)} is already about this position (${cur.designation})`;
      cur = null;
    } else if (cur) claimed.set(cur.id, p.line);
    let changes: ImportRow["changes"] = [];
    let positionPatch: PlannedRow["positionPatch"] = {};
    let componentPatch: PlannedRow["componentPatch"] = {};
    if (cur && rec) {
      if (key(rec.board) !== key(cur.boardName))
        errors.board = `This position is on ${cur.boardName}: an import does not move positions between boards`;
      ({ changes, positionPatch, componentPatch } = diffRow(p, rec, cur));
      const v = (p.cells.row_version ?? "").trim();
      if (v && !/^p\d+(c\d+)?$/i.test(v)) errors.row_version = "Leave row_version as exported (e.g. p3c5), or empty";
      else if (v && changes.length && v.toLowerCase() !== versionOf(cur))
        errors.row_version =
          "Changed in Tideline since this file was exported: export again and make this row's change there, so nobody's edit is lost";
    }
    if (rec && !cur) {
      const board = state.boards.get(key(rec.board));
      if (!board && !boardsToCreate.has(key(rec.board))) boardsToCreate.set(key(rec.board), rec.board);
    }
    if (rec && rec.section) {
      const board = state.boards.get(key(rec.board));
      if (!board || !state.sections.has(`${board.id}|${key(rec.section)}`))
        sectionsToCreate.add(`${rec.board} / ${rec.section}`);
    }
    const row: ImportRow = {
      line: p.line,
      ok: true,
      action: "create",
      positionId: cur?.id ?? null,
      matchedBy: cur ? m.by : null,
      errors,
      changes,
      ignored: ignoredOf(p, cur),
      data: rec,
      cells: p.cells,
    };
    planned.push({ row, record: rec, current: cur, positionPatch, componentPatch });
  }

  checkFinalState(state, planned);

  for (const pr of planned) {
    const r = pr.row;
    r.ok = Object.keys(r.errors).length === 0;
    r.action = (!r.ok ? "problem" : !pr.current ? "create" : r.changes.length ? "update" : "unchanged") as ImportAction;
  }
  const rows = planned.map((x) => x.row);
  const failed = rows.filter((r) => !r.ok).length;
  const count = (a: ImportAction) => rows.filter((r) => r.action === a).length;
  const planDigest = createHash("sha256")
    .update(
      JSON.stringify(
        planned.map((x) => [
          x.row.line,
          x.row.action,
          x.row.positionId,
          x.current ? versionOf(x.current) : null,
          x.row.changes,
          x.record,
        ]),
      ),
    )
    .digest("hex");
  const response: ImportResponse = {
    rows,
    summary: {
      rows: rows.length,
      ok: rows.length - failed,
      failed,
      created: count("create"),
      changed: count("update"),
      unchanged: count("unchanged"),
      boardsToCreate: [...boardsToCreate.values()],
      sectionsToCreate: [...sectionsToCreate],
      ignoredColumns,
      encoding: { name: decoded.encoding, how: decoded.how, confidence: decoded.confidence },
      separator,
      columns,
      planDigest,
      committed: false,
    },
  };
  return { response, planned };
}

/**
 * Designations per board, tag numbers per site and grid cells, on the inventory as it would
 * be: positions the file does not touch keep theirs; each row claims its new ones in file
 * order, so the later of two clashing rows is the one refused. A refused row changes nothing,
 * so its position keeps its own claims: the check is repeated until the refused rows settle
 * (each round can only refuse more, so it ends).
 */
function checkFinalState(state: SiteState, planned: PlannedRow[]) {
  const base = planned.map((x) => ({ ...x.row.errors }));
  let failed = new Set(planned.filter((_, i) => Object.keys(base[i]).length).map((x) => x.row.line));
  for (let round = 0; round < 50; round++) {
    planned.forEach((x, i) => {
      if (!failed.has(x.row.line)) x.row.errors = { ...base[i] }; // a refused row keeps why it was refused
    });
    claimAll(state, planned, failed);
    const now = new Set(planned.filter((x) => Object.keys(x.row.errors).length).map((x) => x.row.line));
    if (now.size === failed.size) return;
    failed = now;
  }
}

function claimAll(state: SiteState, planned: PlannedRow[], failed: Set<number>) {
  const touched = new Set(planned.filter((x) => x.current && !failed.has(x.row.line)).map((x) => x.current!.id));
  const designations = new Map<string, string>();
  const tags = new Map<string, string>();
  const cells = new Map<string, string>();
  for (const p of state.positions.values()) {
    if (touched.has(p.id)) continue;
    designations.set(`${p.boardId}|${key(p.designation)}`, "db");
    for (const c of cellsOf(p.boardId, p)) cells.set(c, p.designation);
  }
  for (const [t, c] of state.tags) {
    const pos = state.positions.get(c.positionId);
    if (!pos || !touched.has(pos.id) || pos.componentId !== c.id) tags.set(t, "db");
  }
  for (const x of planned) {
    const { record: rec, current: cur, row } = x;
    if (!rec || failed.has(row.line)) continue;
    const errors = row.errors;
    const board = cur ? state.boards.get(key(cur.boardName)) : state.boards.get(key(rec.board));
    const boardKey = board?.id ?? `new:${key(rec.board)}`;
    const designation = (x.positionPatch.designation as string | undefined) ?? cur?.designation ?? rec.designation;
    const dKey = `${boardKey}|${key(designation)}`;
    const dOwner = designations.get(dKey);
    if (dOwner === "db") errors.designation ??= "Already on this board";
    else if (dOwner) errors.designation ??= `Also on ${dOwner} for this board`;
    else designations.set(dKey, `line ${row.line}`);
    const tag = cur && !("tag_number" in row.cells) ? cur.tagNumber : rec.tagNumber;
    if (tag) {
      const owner = tags.get(key(tag));
      if (owner === "db") errors.tag_number ??= "Already on a component of this site";
      else if (owner) errors.tag_number ??= `Also on ${owner}`;
      else tags.set(key(tag), `line ${row.line}`);
    }
    const shape = {
      gridRow: (x.positionPatch.gridRow as number | undefined) ?? cur?.gridRow ?? rec.gridRow,
      gridCol: (x.positionPatch.gridCol as number | undefined) ?? cur?.gridCol ?? rec.gridCol,
      rowSpan: (x.positionPatch.rowSpan as number | undefined) ?? cur?.rowSpan ?? rec.rowSpan,
      colSpan: (x.positionPatch.colSpan as number | undefined) ?? cur?.colSpan ?? rec.colSpan,
    };
    if (board && shape.gridRow + shape.rowSpan - 1 > board.gridRows)
      errors.grid_row ??= `The board has ${board.gridRows} rows`;
    if (board && shape.gridCol + shape.colSpan - 1 > board.gridCols)
      errors.grid_col ??= `The board has ${board.gridCols} columns`;
    if (Object.keys(errors).length) continue;
    const mine = cellsOf(boardKey, shape);
    const hit = mine.map((c) => cells.get(c)).find((v) => v !== undefined);
    if (hit !== undefined) errors.grid_col = `That grid cell is taken by ${hit}`;
    else for (const c of mine) cells.set(c, `${designation} (line ${row.line})`);
  }
}
