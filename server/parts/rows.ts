/** Builds the wanted-list rows the API sends: a line with its positions, quantity, money and photos. */
import { budgetByBoard, partTitle } from "../../src/domain/part-workflow";
import type { PartLine, PartsBudget } from "../../src/schemas/parts";
import type { Db } from "../db";
import { conflict, notFound } from "../errors";
import { lineSpec } from "./demand";
import * as repo from "./repository";

type LinkRow = Awaited<ReturnType<typeof repo.linksOfLines>>[number];

const iso = (d: Date | string) => (d instanceof Date ? d.toISOString() : new Date(d).toISOString());

/** Quantity a line stands for: its manual quantity plus active demand, or, once fitted, what was fitted. */
export function lineQty(line: Pick<repo.LineRecord, "status" | "manualQty">, links: Array<Pick<LinkRow, "qty" | "active" | "fitted">>) {
  const counted = line.status === "fitted" ? links.filter((l) => l.fitted) : links.filter((l) => l.active);
  return line.manualQty + counted.reduce((s, l) => s + l.qty, 0);
}

export async function buildRows(db: Db, lines: repo.LineRecord[], withWithdrawn = false): Promise<PartLine[]> {
  const ids = lines.map((l) => l.id);
  const [links, leads, spent] = await Promise.all([repo.linksOfLines(db, ids, withWithdrawn), repo.leadCounts(db, ids), repo.spentByLine(db, ids)]);
  const componentIds = [...new Set(links.filter((l) => l.componentId && (l.active || l.fitted)).map((l) => l.componentId!))];
  const photos = await repo.nameplatePhotos(db, componentIds);
  const leadN = new Map(leads.map((l) => [l.lineId, Number(l.n)]));
  const spentN = new Map(spent.map((s) => [s.lineId, Number(s.spent)]));
  return lines.map((line) => {
    const mine = links.filter((l) => l.lineId === line.id);
    const qty = lineQty(line, mine);
    const comps = new Set(mine.filter((l) => l.active || l.fitted).map((l) => l.componentId));
    return {
      id: line.id,
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
      qty,
      estimatedUnitCost: line.estimatedUnitCost,
      estimated: line.estimatedUnitCost == null ? null : Math.round(line.estimatedUnitCost * qty * 100) / 100,
      spent: spentN.get(line.id) ?? 0,
      leadCount: leadN.get(line.id) ?? 0,
      photoIds: photos.filter((p) => comps.has(p.componentId)).map((p) => p.id),
      positions: mine.map((l) => ({
        linkId: l.id, positionId: l.positionId, designation: l.designation, boardId: l.boardId, boardName: l.boardName,
        componentId: l.componentId, defectId: l.defectId, defectTitle: l.defectTitle, qty: l.qty,
        state: l.fitted ? ("fitted" as const) : l.active ? ("active" as const) : ("withdrawn" as const),
      })),
      updatedAt: iso(line.updatedAt),
    };
  });
}

/** Estimated vs spent per board and in total, over every line that is not cancelled. */
export async function siteBudget(db: Db, siteId: string, boards: Array<{ id: string; name: string }>): Promise<PartsBudget> {
  const lines = (await repo.listLines(db, siteId, { status: "all" })).filter((l) => l.status !== "cancelled");
  const rows = await buildRows(db, lines);
  const names = new Map(boards.map((b) => [b.id, b.name]));
  const budget = budgetByBoard(
    rows.map((r) => {
      const qtyByBoard: Record<string, number> = {};
      for (const p of r.positions.filter((x) => (r.status === "fitted" ? x.state === "fitted" : x.state === "active")))
        qtyByBoard[p.boardId ?? ""] = (qtyByBoard[p.boardId ?? ""] ?? 0) + p.qty;
      if (r.manualQty) qtyByBoard[""] = (qtyByBoard[""] ?? 0) + r.manualQty;
      return { qtyByBoard, estimatedUnitCost: r.estimatedUnitCost, spent: r.spent };
    }),
  );
  return {
    rows: budget.rows.map((b) => ({ ...b, boardName: b.boardId ? names.get(b.boardId) ?? "Board" : "Not tied to a board" })),
    total: budget.total,
  };
}

export async function lineRow(db: Db, siteId: string, lineId: string, withWithdrawn = false) {
  const line = await repo.findLine(db, siteId, lineId);
  if (!line) throw notFound("That wanted-list line");
  return (await buildRows(db, [line], withWithdrawn))[0];
}

/** Loads the line for update and checks the version; stale → 409 with the line as it is now. */
export async function lockedLine(trx: Db, siteId: string, lineId: string, version: number) {
  const line = await repo.findLine(trx, siteId, lineId, true);
  if (!line) throw notFound("That wanted-list line");
  if (line.version !== version) throw conflict("Someone changed this line since you opened it. Here it is as it is now.", await lineRow(trx, siteId, lineId));
  return line;
}
