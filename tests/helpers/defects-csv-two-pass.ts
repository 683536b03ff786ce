/**
 * The defect CSV as the two-pass design wrote it before the single cursor pass (kept as the reference the
 * new writer is compared with, byte for byte): the ordered ids of every matching defect first, then pages
 * of those ids read by primary key in that order, each row formatted by the record below (a frozen copy
 * of the old one). Nothing changes the data while a test uses it, so the pages need no second filter.
 */
import { sql } from "kysely";
import { BOM, csvLines, guardCell } from "../../server/csv";
import type { Db } from "../../server/db";
import { CSV_COLUMNS, csvHeader } from "../../server/defects/csv";
import { applyFilters, applySort, registerBase, type RegisterRow } from "../../server/defects/list-repository";
import { localDateTime } from "../../src/domain/local-time";
import { DEFECT_CATEGORY_LABELS, DEFECT_SEVERITY_LABELS, DEFECT_STATUS_LABELS } from "../../src/domain/vocab";
import { PARTS_STATE_LABELS, type ListQuery } from "../../src/schemas/defects";

const yn = (b: boolean) => (b ? "yes" : "no");

function record(r: RegisterRow, timeZone: string): Array<string | number> {
  const t = (v: string | null) => guardCell(v ?? "");
  return [
    `D-${r.ref}`,
    t(r.title),
    t(r.boardName),
    t(r.sectionName),
    t(r.designation),
    DEFECT_CATEGORY_LABELS[r.category],
    DEFECT_SEVERITY_LABELS[r.severity],
    DEFECT_STATUS_LABELS[r.status],
    t(r.statusReason),
    yn(r.safetyCritical),
    yn(r.blocksEnergisation),
    r.effortHours ?? "",
    r.costEstimate ?? "",
    t(r.partsNeeded),
    PARTS_STATE_LABELS[r.partsState],
    t(r.assigneeName),
    r.dueOn ?? "",
    r.priorityScore,
    r.pinned ?? "",
    localDateTime(r.createdAt, timeZone),
    localDateTime(r.updatedAt, timeZone),
    t(r.description),
  ];
}

export async function twoPassDefectsCsv(db: Db, siteId: string, timeZone: string, f: ListQuery, today: string) {
  const ids = (
    await applySort(applyFilters(registerBase(db, siteId), f, today, siteId), f.sort, f.dir)
      .select("d.id")
      .execute()
  ).map((r) => r.id as string);
  let text = BOM + csvLines([csvHeader(timeZone)]);
  for (let from = 0; from < ids.length; from += 1000) {
    const page = ids.slice(from, from + 1000);
    const rows = (await registerBase(db, siteId)
      .innerJoin(
        sql<{ id: string; n: number }>`(SELECT x.id, x.n FROM unnest(${page}::uuid[]) WITH ORDINALITY AS x(id, n))`.as(
          "o",
        ),
        (j) => j.onRef("o.id", "=", "d.id"),
      )
      .select(CSV_COLUMNS)
      .orderBy(sql`o.n`)
      .execute()) as RegisterRow[];
    text += csvLines(rows.map((r) => record(r, timeZone)));
  }
  return text;
}
