/**
 * Site overview counts (see overviewResponse in src/schemas/inventory.ts for each definition),
 * read from the per-board summaries the writes keep current (server/inventory/board-summaries-repository.ts):
 * one grouped statement over a few dozen rows per board, so its cost grows with boards, not
 * positions. Board facet rows stay per board; the others are summed over the site.
 */
import { CUSTODY, DISPOSITIONS } from "../../src/domain/vocab";
import { GRADE_KEYS, type Overview } from "../../src/schemas/inventory";
import type { Db } from "../db";
import { summaryTallies } from "./board-summaries-repository";
import { boardNames } from "./boards-repository";

const zeros = <K extends string>(keys: readonly K[]) =>
  Object.fromEntries(keys.map((k) => [k, 0])) as Record<K, number>;

const has = <K extends string>(rec: Record<K, number>, k: string): k is K => Object.hasOwn(rec, k);

export async function overview(db: Db, siteId: string): Promise<Overview> {
  const [{ rows }, boards] = await Promise.all([summaryTallies(db, siteId), boardNames(db, siteId)]);
  const bySurveyState = zeros(["not_surveyed", "inspected", "decided"] as const);
  const byDisposition = zeros([...DISPOSITIONS, "undecided"] as const);
  const byCustody = zeros(CUSTODY);
  const byGrade = zeros(GRADE_KEYS);
  const perBoard = new Map(boards.map((b) => [b.id, { id: b.id, name: b.name, positions: 0, surveyed: 0 }]));
  let positions = 0;
  let surveyed = 0;
  let retained = 0;
  for (const r of rows) {
    if (r.facet === "positions") {
      const b = perBoard.get(r.boardId!);
      if (b) {
        b.positions += r.n;
        if (r.surveyed) b.surveyed += r.n;
      }
      positions += r.n;
      if (r.surveyed) surveyed += r.n;
    } else if (r.facet === "disposition") {
      if (has(byDisposition, r.key)) byDisposition[r.key] += r.n;
      bySurveyState[r.key !== "undecided" ? "decided" : r.surveyed ? "inspected" : "not_surveyed"] += r.n;
    } else if (r.facet === "custody") {
      if (has(byCustody, r.key)) byCustody[r.key] += r.n; // 'none': a position without a current component
    } else if (r.facet === "grade") {
      if (has(byGrade, r.key)) byGrade[r.key] += r.n;
    } else if (r.facet === "retained" && r.key === "yes") retained += r.n;
  }
  return {
    totals: { positions, surveyed, bySurveyState },
    byDisposition,
    byCustody,
    byGrade,
    originalRetained: retained,
    originalRetainedPercent: positions ? Math.round((retained / positions) * 1000) / 10 : null,
    boards: [...perBoard.values()],
  };
}
