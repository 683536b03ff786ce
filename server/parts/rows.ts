/** Builds the wanted-list rows the API sends: a line with its positions, quantity, money and photos. */
import { lineRef, partTitle } from "../../src/domain/part-workflow";
import { LINKS_IN_ROW, type PartLine, type PartsBudget } from "../../src/schemas/parts";
import type { Db } from "../db";
import { conflict, notFound } from "../errors";
import { lineSpec } from "./demand";
import { keptBudget } from "./budget-repository";
import * as repo from "./repository";

type LinkRow = Awaited<ReturnType<typeof repo.linksOfLines>>[number];

const iso = (d: Date | string) => (d instanceof Date ? d.toISOString() : new Date(d).toISOString());

/** Quantity a line stands for: its manual quantity plus active demand, or, once fitted, what was fitted. */
export function lineQty(
  line: Pick<repo.LineRecord, "status" | "manualQty">,
  links: Array<Pick<LinkRow, "qty" | "active" | "fitted">>,
) {
  const counted = line.status === "fitted" ? links.filter((l) => l.fitted) : links.filter((l) => l.active);
  return line.manualQty + counted.reduce((s, l) => s + l.qty, 0);
}

/**
 * Builds the rows of these lines with every link and every nameplate photo (the CSV and the public share
 * link, which show them all): four queries in all (links, lead counts, spend, photos), grouped by line once.
 * The list and the line's page use `pageRows`, which carries the first few links and a count.
 */
export async function buildRows(db: Db, lines: repo.LineRecord[]): Promise<PartLine[]> {
  if (!lines.length) return [];
  const ids = lines.map((l) => l.id);
  const [links, leads, spent] = await Promise.all([
    repo.linksOfLines(db, ids),
    repo.leadCounts(db, ids),
    repo.spentByLine(db, ids),
  ]);
  const componentIds = [
    ...new Set(links.filter((l) => l.componentId && (l.active || l.fitted)).map((l) => l.componentId!)),
  ];
  const photos = await repo.nameplatePhotos(db, componentIds);
  const leadN = new Map(leads.map((l) => [l.lineId, Number(l.n)]));
  const spentN = new Map(spent.map((s) => [s.lineId, Number(s.spent)]));
  const linksByLine = groupBy(links, (l) => l.lineId);
  const photosByComponent = groupBy(photos, (p) => p.componentId ?? "");
  return lines.map((line) => {
    const mine = linksByLine.get(line.id) ?? [];
    const qty = lineQty(line, mine);
    const comps = [
      ...new Set(
        mine
          .filter((l) => l.active || l.fitted)
          .map((l) => l.componentId)
          .filter((c): c is string => !!c),
      ),
    ];
    const photoIds = comps
      .flatMap((c) => photosByComponent.get(c) ?? [])
      .sort((a, b) => a.order - b.order)
      .map((p) => p.id);
    return {
      ...lineFields(line),
      qty,
      estimated: line.estimatedUnitCost == null ? null : Math.round(line.estimatedUnitCost * qty * 100) / 100,
      spent: spentN.get(line.id) ?? 0,
      leadCount: leadN.get(line.id) ?? 0,
      photoIds,
      positions: mine.map((l) => ({
        linkId: l.id,
        positionId: l.positionId,
        designation: l.designation,
        boardId: l.boardId,
        boardName: l.boardName,
        componentId: l.componentId,
        defectId: l.defectId,
        defectTitle: l.defectTitle,
        qty: l.qty,
        state: linkState(l),
      })),
      linkCount: mine.filter((l) => l.active || l.fitted).length,
    };
  });
}

const linkState = (l: { active: boolean; fitted: boolean }) =>
  l.fitted ? ("fitted" as const) : l.active ? ("active" as const) : ("withdrawn" as const);

/** What a row says about its line itself (spec, status, rule, notes), the same in every kind of row. */
function lineFields(line: repo.LineRecord) {
  return {
    id: line.id,
    number: line.number,
    ref: lineRef(line.number),
    version: line.version,
    origin: line.origin,
    kind: line.kind,
    ratingAmps: line.ratingAmps,
    poles: line.poles,
    voltageRating: line.voltageRating,
    frame: line.frame,
    mounting: line.mounting,
    maker: line.maker,
    model: line.model,
    need: line.need,
    title: partTitle(lineSpec(line), line.need),
    mustMatch: (line.mustMatch ?? null) as PartLine["mustMatch"],
    status: line.status,
    heritageRule: line.heritageRule,
    cancelReason: line.cancelReason,
    notes: line.notes,
    manualQty: line.manualQty,
    estimatedUnitCost: line.estimatedUnitCost,
    updatedAt: iso(line.updatedAt),
  };
}

/**
 * Rows of the lines `pageOfLines` read (quantity, counts, spend and first links already in them): the list's
 * page and the line's heading. No further query.
 */
export function pageRows(lines: repo.PagedLine[]): PartLine[] {
  return lines.map((line) => ({
    ...lineFields(line),
    qty: line.qty,
    estimated: line.estimatedUnitCost == null ? null : Math.round(line.estimatedUnitCost * line.qty * 100) / 100,
    spent: line.spent,
    leadCount: line.leadCount,
    photoIds: [...new Set(line.preview.flatMap((l) => (l.photoId ? [l.photoId] : [])))],
    positions: line.preview.map((l) => ({
      linkId: l.linkId,
      positionId: l.positionId,
      designation: l.designation,
      boardId: l.boardId,
      boardName: l.boardName,
      componentId: l.componentId,
      defectId: l.defectId,
      defectTitle: l.defectTitle,
      qty: l.qty,
      state: linkState(l),
    })),
    linkCount: line.linkCount,
  }));
}

function groupBy<T>(rows: readonly T[], key: (r: T) => string): Map<string, Array<T & { order: number }>> {
  const out = new Map<string, Array<T & { order: number }>>();
  rows.forEach((r, order) => {
    const k = key(r);
    const list = out.get(k);
    if (list) list.push({ ...r, order });
    else out.set(k, [{ ...r, order }]);
  });
  return out;
}

/**
 * Estimated vs spent per board and in total, over every line that is not cancelled, read from the
 * sums the writes keep (server/parts/budget-repository.ts; one row a board): estimated = unit cost × quantity
 * on the board; spent = the line's acquisitions shared in proportion to each board's quantity
 * (proportional allocation, common practice; the same rule as budgetByBoard in
 * src/domain/part-workflow.ts, which the tests hold it to). A fitted line counts its fitted links,
 * any other its active ones; hand-added quantity and links with no board are "not tied to a
 * board"; a line with spend but no quantity left puts its spend there too.
 */
export async function siteBudget(
  db: Db,
  siteId: string,
  boardsRead: Promise<Array<{ id: string; name: string }>>,
): Promise<PartsBudget> {
  const [r, boards] = await Promise.all([keptBudget(db, siteId), boardsRead]);
  const names = new Map(boards.map((b) => [b.id, b.name]));
  const rows = r.rows.map((b) => ({
    ...b,
    boardName: b.boardId ? (names.get(b.boardId) ?? "Board") : "Not tied to a board",
  }));
  const round2 = (x: number) => Math.round(x * 100) / 100;
  const total = rows.reduce(
    (t, b) => ({ estimated: round2(t.estimated + b.estimated), spent: round2(t.spent + b.spent) }),
    { estimated: 0, spent: 0 },
  );
  return { rows, total };
}

/** One line's row, as the list shows it (its first positions and their count): one statement. */
export async function lineRow(db: Db, siteId: string, lineId: string) {
  const [line] = await repo.pageOfLines(db, siteId, { ids: [lineId] }, LINKS_IN_ROW);
  if (!line) throw notFound("That wanted-list line");
  return pageRows([line])[0];
}

/** Loads the line for update and checks the version; stale → 409 with the line as it is now. */
export async function lockedLine(trx: Db, siteId: string, lineId: string, version: number) {
  const line = await repo.findLine(trx, siteId, lineId, true);
  if (!line) throw notFound("That wanted-list line");
  if (line.version !== version)
    throw conflict(
      "Someone changed this line since you opened it. Here it is as it is now.",
      await lineRow(trx, siteId, lineId),
    );
  return line;
}
