/** Use cases for positions: create (with their empty component), generate a row, reorder, edit, delete. */
import type { Selectable } from "kysely";
import type { BoardsTable } from "../../db/types";
import type { CreatePositionBody, GeneratePositionsBody, PatchPositionBody } from "../../src/schemas/inventory";
import { diff, recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError } from "../errors";
import { UNIQUE, defined, mapUnique, requireOwned, stale, updateVersioned } from "./common";
import * as repo from "./positions-repository";
import { demandChanged, demandOfPosition, holdDemand } from "../parts/service";
import { lockDefectsFor } from "../defects/service";
import { refreshBoardSummaries } from "./board-summaries-repository";

type Board = Selectable<BoardsTable>;
interface Cell {
  gridRow: number;
  gridCol: number;
  rowSpan?: number;
  colSpan?: number;
}

/** Field errors when the cell (with its span) leaves the board's grid. */
export function gridFields(board: Pick<Board, "gridRows" | "gridCols">, c: Cell, prefix = ""): Record<string, string> {
  const f: Record<string, string> = {};
  if (c.gridRow + (c.rowSpan ?? 1) - 1 > board.gridRows) f[`${prefix}gridRow`] = `The board has ${board.gridRows} rows`;
  if (c.gridCol + (c.colSpan ?? 1) - 1 > board.gridCols)
    f[`${prefix}gridCol`] = `The board has ${board.gridCols} columns`;
  return f;
}

function requireFits(board: Board, c: Cell) {
  const f = gridFields(board, c);
  if (Object.keys(f).length)
    throw new AppError(400, "invalid_input", "That position does not fit on the board's grid.", f);
}

const overlaps = (a: Required<Cell>, b: Required<Cell>) =>
  a.gridRow < b.gridRow + b.rowSpan &&
  b.gridRow < a.gridRow + a.rowSpan &&
  a.gridCol < b.gridCol + b.colSpan &&
  b.gridCol < a.gridCol + a.colSpan;
const full = (c: Cell): Required<Cell> => ({
  gridRow: c.gridRow,
  gridCol: c.gridCol,
  rowSpan: c.rowSpan ?? 1,
  colSpan: c.colSpan ?? 1,
});

/**
 * One position per grid cell, as the CSV import refuses: 409 naming the position that
 * covers the cell. The exclusion constraint positions_one_per_cell (migration
 * 2026_12_02_0220) backs this for two saves at the same moment.
 */
async function requireFreeCells(trx: Db, boardId: string, cells: Cell[], exceptId?: string) {
  const others = (await repo.boardPositions(trx, boardId)).filter((p) => p.id !== exceptId);
  for (const c of cells.map(full)) {
    const hit = others.find((p) => overlaps(full(p), c));
    if (hit)
      throw new AppError(409, "cell_taken", `That grid cell is taken by ${hit.designation}.`, {
        gridRow: `Taken by ${hit.designation}`,
        gridCol: `Taken by ${hit.designation}`,
      });
  }
  const own = cells.map(full);
  own.forEach((a, i) => {
    if (own.some((b, j) => j < i && overlaps(a, b)))
      throw new AppError(409, "cell_taken", "Two of these positions would share a grid cell.", {
        gridCol: "Overlaps another new position",
      });
  });
}

async function requireSectionOf(db: Db, siteId: string, boardId: string, sectionId: string | null | undefined) {
  if (!sectionId) return;
  const s = await requireOwned(db, "sections", siteId, sectionId, "That section");
  if (s.boardId !== boardId)
    throw new AppError(400, "invalid_input", "That section belongs to another board.", {
      sectionId: "Not a section of this board",
    });
}

async function insertWithComponents(
  trx: Db,
  siteId: string,
  board: Board,
  actorId: string,
  items: CreatePositionBody[],
) {
  const positions = await mapUnique(
    () =>
      repo.insertPositions(
        trx,
        items.map((b) => ({
          siteId,
          boardId: board.id,
          ...defined(b),
          designation: b.designation,
          kind: b.kind,
          gridRow: b.gridRow,
          gridCol: b.gridCol,
        })),
      ),
    UNIQUE.designation,
  );
  const components = await repo.insertComponents(
    trx,
    positions.map((p) => ({ siteId, positionId: p.id, kind: p.kind })),
  );
  for (const p of positions)
    await recordAudit(trx, {
      siteId,
      entityType: "position",
      entityId: p.id,
      boardId: board.id,
      positionId: p.id,
      action: "create",
      actorId,
      after: p,
    });
  await refreshBoardSummaries(trx, [board.id]);
  return positions.map((position) => ({ position, component: components.find((c) => c.positionId === position.id)! }));
}

export async function createPosition(
  db: Db,
  siteId: string,
  boardId: string,
  actorId: string,
  body: CreatePositionBody,
) {
  return db.transaction().execute(async (trx) => {
    const board = await requireOwned(trx, "boards", siteId, boardId, "That board");
    requireFits(board, body);
    await requireFreeCells(trx, boardId, [body]);
    await requireSectionOf(trx, siteId, boardId, body.sectionId);
    return (await insertWithComponents(trx, siteId, board, actorId, [body]))[0];
  });
}

/** "1-1" … "1-12" on one grid row, left to right from startCol; refused whole if any name is taken. */
export async function generatePositions(
  db: Db,
  siteId: string,
  boardId: string,
  actorId: string,
  b: GeneratePositionsBody,
) {
  return db.transaction().execute(async (trx) => {
    const board = await requireOwned(trx, "boards", siteId, boardId, "That board", true);
    const count = b.to - b.from + 1;
    if (b.gridRow > board.gridRows || b.startCol + count - 1 > board.gridCols)
      throw new AppError(
        400,
        "invalid_input",
        `${count} positions from column ${b.startCol} do not fit on a board ${board.gridCols} columns wide.`,
        { startCol: `Room for ${Math.max(0, board.gridCols - b.startCol + 1)} from here` },
      );
    await requireSectionOf(trx, siteId, boardId, b.sectionId);
    const base = (await repo.boardPositions(trx, boardId)).reduce((m, p) => Math.max(m, p.sortOrder + 1), 0);
    const items = Array.from({ length: count }, (_, i) => ({
      designation: `${b.prefix}${b.from + i}`,
      kind: b.kind,
      gridRow: b.gridRow,
      gridCol: b.startCol + i,
      sectionId: b.sectionId ?? null,
      sortOrder: base + i,
    }));
    const taken = await repo.designationsTaken(
      trx,
      boardId,
      items.map((x) => x.designation),
    );
    if (taken.length)
      throw new AppError(409, "duplicate", `Already on this board: ${taken.join(", ")}.`, {
        prefix: `Already used: ${taken.join(", ")}`,
      });
    await requireFreeCells(trx, boardId, items);
    return insertWithComponents(trx, siteId, board, actorId, items);
  });
}

/** The listed positions take the listed order within the sort slots they already hold. */
export async function reorderPositions(db: Db, siteId: string, boardId: string, actorId: string, ids: string[]) {
  return db.transaction().execute(async (trx) => {
    await requireOwned(trx, "boards", siteId, boardId, "That board", true);
    const all = await repo.boardPositions(trx, boardId);
    const byId = new Map(all.map((p) => [p.id, p]));
    if (new Set(ids).size !== ids.length)
      throw new AppError(400, "invalid_input", "A position is listed twice.", { ids: "Each position once" });
    const missing = ids.filter((id) => !byId.has(id));
    if (missing.length)
      throw new AppError(400, "invalid_input", "Some positions are not on this board.", {
        ids: `Not on this board: ${missing.length}`,
      });
    const before = all.map((p) => p.id);
    const slots = ids.map((id) => byId.get(id)!.sortOrder).sort((x, y) => x - y);
    const taken = new Set(slots);
    // Slots may repeat (e.g. all 0 on a fresh board): then spread the listed ones after the rest.
    const order = taken.size === slots.length ? slots : ids.map((_, i) => all.length + i);
    for (let i = 0; i < ids.length; i++)
      if (byId.get(ids[i])!.sortOrder !== order[i]) await repo.setSortOrder(trx, ids[i], order[i]);
    const positions = await repo.boardPositions(trx, boardId);
    await recordAudit(trx, {
      siteId,
      entityType: "board",
      entityId: boardId,
      boardId,
      action: "reorder",
      actorId,
      before: { order: before },
      after: { order: positions.map((p) => p.id) },
    });
    return positions;
  });
}

export async function patchPosition(db: Db, siteId: string, id: string, actorId: string, body: PatchPositionBody) {
  const { version, ...rest } = body;
  const patch = defined(rest);
  return db.transaction().execute(async (trx) => {
    const before = await requireOwned(trx, "positions", siteId, id, "That position", true);
    if (before.version !== version) throw stale("position", before);
    const board = await requireOwned(trx, "boards", siteId, before.boardId, "That board");
    requireFits(board, { ...before, ...patch });
    if (["gridRow", "gridCol", "rowSpan", "colSpan"].some((k) => k in patch))
      await requireFreeCells(trx, before.boardId, [{ ...before, ...patch }], id);
    await requireSectionOf(trx, siteId, before.boardId, patch.sectionId);
    const after = await mapUnique(
      () => updateVersioned(trx, "positions", siteId, id, version, patch, "position"),
      UNIQUE.designation,
    );
    const d = diff(before as never, patch as never);
    if (d.changed)
      await recordAudit(trx, {
        siteId,
        entityType: "position",
        entityId: id,
        boardId: before.boardId,
        positionId: id,
        action: "update",
        actorId,
        before: d.before,
        after: d.after,
      });
    if (patch.kind && patch.kind !== before.kind) await followKind(trx, siteId, before, patch.kind, actorId);
    return after;
  });
}

/** A slot set up with the wrong kind: its component follows, unless someone already gave it a kind of its own. */
async function followKind(
  trx: Db,
  siteId: string,
  before: { id: string; boardId: string; kind: string },
  kind: CreatePositionBody["kind"],
  actorId: string,
) {
  const c = await repo.currentComponent(trx, before.id);
  if (!c || c.kind !== before.kind) return;
  await updateVersioned(trx, "components", siteId, c.id, c.version, { kind }, "component");
  await recordAudit(trx, {
    siteId,
    entityType: "component",
    entityId: c.id,
    boardId: before.boardId,
    positionId: before.id,
    action: "update",
    actorId,
    before: { kind: c.kind },
    after: { kind },
  });
  await demandChanged(trx, siteId, { componentIds: [c.id] }, actorId);
}

/** Removes the position with its component and survey records; the audit keeps what it was. */
export async function deletePosition(db: Db, siteId: string, id: string, actorId: string, version?: number) {
  await db.transaction().execute(async (trx) => {
    const before = await requireOwned(trx, "positions", siteId, id, "That position", true);
    if (version !== undefined && before.version !== version) throw stale("position", before);
    // The delete goes on to its components (deleted) and the defects on it or them (left standing, unplaced):
    // the wanted list's lock order takes them all, then the site's demand lock, then deletes. Held first, the
    // demand lock also keeps a writer past it that names this position (a defect, a link) from waiting on a
    // delete that waits on it.
    const componentIds = await repo.lockComponentsOfPosition(trx, id);
    await lockDefectsFor(trx, siteId, { componentIds, positionIds: [id] });
    await holdDemand(trx, siteId);
    const component = await repo.currentComponent(trx, id);
    const demand = await demandOfPosition(trx, siteId, id);
    await repo.deletePosition(trx, id);
    await recordAudit(trx, {
      siteId,
      entityType: "position",
      entityId: id,
      boardId: before.boardId,
      positionId: id,
      action: "delete",
      actorId,
      before: { ...before, component },
    });
    // Its demand links went with the component; lines left empty close, defects that rode on it stand alone.
    await demandChanged(trx, siteId, demand, actorId);
    await refreshBoardSummaries(trx, [before.boardId]);
  });
}

export async function lookup(db: Db, siteId: string, q: string) {
  const rows = await repo.lookup(db, siteId, q);
  return rows.map(({ rank, score: _score, ...r }) => ({ ...r, exact: rank === 0 }));
}
