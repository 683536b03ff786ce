/**
 * Boards, positions, components and defects written straight to the tables, for the wanted-list tests.
 * A direct write bypasses the inventory and defects services, so each helper then tells the parts
 * domain what changed (`registerChanged`), as those services do in their transactions.
 */
import type { Db } from "../../server/db";
import { syncDemand } from "../../server/parts/service";
import { refreshBoardSummaries, refreshSummariesOfPositions } from "../../server/inventory/board-summaries-repository";
import type { ComponentKind, Disposition } from "../../src/domain/vocab";

export async function makeBoard(db: Db, siteId: string, name = "Main switchboard") {
  return db.insertInto("boards").values({ siteId, name }).returning(["id", "name"]).executeTakeFirstOrThrow();
}

let col = 0;
export interface Nameplate {
  kind?: ComponentKind;
  ratingAmps?: number | null;
  poles?: number | null;
  voltageRating?: number | null;
  frame?: string;
  mounting?: string;
  maker?: string;
  model?: string;
  disposition?: Disposition | null;
}

export const BREAKER: Nameplate = {
  kind: "power_breaker",
  ratingAmps: 225,
  poles: 3,
  voltageRating: 600,
  frame: "K-225",
  mounting: "Drawout",
  maker: "Northbay Electric",
  model: "NB 3",
};

export async function makeComponent(
  db: Db,
  siteId: string,
  boardId: string,
  designation: string,
  np: Nameplate = BREAKER,
) {
  const { disposition = null, kind = "power_breaker", ...rest } = np;
  const position = await db
    .insertInto("positions")
    .values({ siteId, boardId, designation, kind, gridRow: 1, gridCol: ++col })
    .returning("id")
    .executeTakeFirstOrThrow();
  const component = await db
    .insertInto("components")
    .values({ siteId, positionId: position.id, kind, disposition, ...rest })
    .returning(["id", "version"])
    .executeTakeFirstOrThrow();
  await registerChanged(db, siteId, { componentIds: [component.id] });
  await db.transaction().execute((trx) => refreshBoardSummaries(trx, [boardId])); // as the inventory services do
  return { positionId: position.id, componentId: component.id, designation };
}

/** What the inventory and defects services do after a change: bring the wanted list in line for those sources. */
export const registerChanged = (db: Db, siteId: string, scope: { componentIds?: string[]; defectIds?: string[] }) =>
  db.transaction().execute((trx) => syncDemand(trx, siteId, scope));

export async function setDisposition(db: Db, componentId: string, disposition: Disposition | null) {
  const c = await db
    .updateTable("components")
    .set({ disposition })
    .where("id", "=", componentId)
    .returning(["siteId", "positionId"])
    .executeTakeFirstOrThrow();
  await registerChanged(db, c.siteId, { componentIds: [componentId] });
  await db.transaction().execute((trx) => refreshSummariesOfPositions(trx, [c.positionId]));
}

export async function makeDefect(
  db: Db,
  siteId: string,
  boardId: string,
  c: { positionId: string; componentId: string } | null,
  o: {
    partsNeeded?: string;
    partsState?: "wanted" | "none_needed";
    status?: "raised" | "under_repair" | "closed";
  } = {},
) {
  const d = await db
    .insertInto("defects")
    .values({
      siteId,
      boardId,
      positionId: c?.positionId ?? null,
      componentId: c?.componentId ?? null,
      title: "Arc chute cracked",
      category: "mechanical",
      severity: "impaired",
      partsNeeded: o.partsNeeded ?? "arc chute",
      partsState: o.partsState ?? "wanted",
      status: o.status ?? "raised",
    })
    .returning(["id"])
    .executeTakeFirstOrThrow();
  await registerChanged(db, siteId, { defectIds: [d.id] });
  return d;
}
