/**
 * Site overview counts (see overviewResponse in src/schemas/inventory.ts for each
 * definition), aggregated by PostgreSQL in one statement (GROUPING SETS): Node receives a
 * few rows per board, never one per position (issue 15).
 */
import { sql } from "kysely";
import { CUSTODY, DISPOSITIONS, type Custody, type Disposition } from "../../src/domain/vocab";
import { GRADE_KEYS, type Overview } from "../../src/schemas/inventory";
import type { Db } from "../db";

const zeros = <K extends string>(keys: readonly K[]) =>
  Object.fromEntries(keys.map((k) => [k, 0])) as Record<K, number>;

interface Tally {
  set: number;
  boardId: string | null;
  disposition: Disposition | null;
  custody: Custody | null;
  grade: number | null;
  surveyed: boolean | null;
  retained: boolean | null;
  n: number;
}

/**
 * One row per group of each grouping set: (board, surveyed), (disposition, surveyed), (custody),
 * (latest ASTM D610 grade), (original fabric retained). `set` is GROUPING()'s bit mask, so a
 * NULL that means "none" (no disposition, ungraded) is told apart from a column not grouped.
 */
const tallies = (db: Db, siteId: string) =>
  sql<Tally>`
    with latest as (
      select distinct on (i.component_id) i.component_id, i.astm_grade
      from inspections i where i.site_id = ${siteId}
      order by i.component_id, i.inspected_at desc, i.created_at desc
    ), surveyed as (
      select distinct i.position_id from inspections i where i.site_id = ${siteId}
    ), pos as (
      select p.board_id, c.disposition, c.custody, l.astm_grade as grade, (s.position_id is not null) as surveyed,
        (c.heritage = 'original' and c.custody not in ('scrapped', 'missing')) is true as retained
      from positions p
      left join components c on c.position_id = p.id and c.retired_at is null
      left join latest l on l.component_id = c.id
      left join surveyed s on s.position_id = p.id
      where p.site_id = ${siteId}
    )
    select grouping(board_id, disposition, custody, grade, surveyed, retained)::int as set,
      board_id as "boardId", disposition, custody, grade, surveyed, retained, count(*)::int as n
    from pos
    group by grouping sets ((board_id, surveyed), (disposition, surveyed), (custody), (grade), (retained))`.execute(db);

// GROUPING() bits, highest first: board_id, disposition, custody, grade, surveyed, retained (1 = not grouped).
const SET = { board: 0b011101, disposition: 0b101101, custody: 0b110111, grade: 0b111011, retained: 0b111110 } as const;

export async function overview(db: Db, siteId: string): Promise<Overview> {
  const [{ rows }, boards] = await Promise.all([
    tallies(db, siteId),
    db.selectFrom("boards").select(["id", "name"]).where("siteId", "=", siteId).orderBy("name").execute(),
  ]);
  const bySurveyState = zeros(["not_surveyed", "inspected", "decided"] as const);
  const byDisposition = zeros([...DISPOSITIONS, "undecided"] as const);
  const byCustody = zeros(CUSTODY);
  const byGrade = zeros(GRADE_KEYS);
  const perBoard = new Map(boards.map((b) => [b.id, { id: b.id, name: b.name, positions: 0, surveyed: 0 }]));
  let positions = 0;
  let surveyed = 0;
  let retained = 0;
  for (const r of rows) {
    if (r.set === SET.board) {
      const b = perBoard.get(r.boardId!);
      if (b) {
        b.positions += r.n;
        if (r.surveyed) b.surveyed += r.n;
      }
      positions += r.n;
      if (r.surveyed) surveyed += r.n;
    } else if (r.set === SET.disposition) {
      byDisposition[r.disposition ?? "undecided"] += r.n;
      bySurveyState[r.disposition ? "decided" : r.surveyed ? "inspected" : "not_surveyed"] += r.n;
    } else if (r.set === SET.custody) {
      if (r.custody) byCustody[r.custody] += r.n;
    } else if (r.set === SET.grade) {
      byGrade[r.grade === null ? "ungraded" : (String(r.grade) as (typeof GRADE_KEYS)[number])] += r.n;
    } else if (r.set === SET.retained && r.retained) retained += r.n;
  }
  return {
    totals: { positions, surveyed, bySurveyState },
    byDisposition,
    byCustody,
    byGrade,
    originalRetainedPercent: positions ? Math.round((retained / positions) * 1000) / 10 : null,
    boards: [...perBoard.values()],
  };
}
