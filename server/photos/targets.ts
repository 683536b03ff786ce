import type { User } from "lucia";
import type { Role } from "../../src/domain/vocab";
import { can } from "../../src/domain/permissions";
import type { Db } from "../db";
import { AppError, forbidden } from "../errors";
import * as repo from "./repository";

export interface Target {
  boardId: string | null;
  positionId: string | null;
  componentId: string | null;
  defectId: string | null;
  inspectionId: string | null;
  custodyMoveId?: string | null;
}
export interface TargetIds {
  boardId?: string | null;
  positionId?: string | null;
  componentId?: string | null;
  defectId?: string | null;
  inspectionId?: string | null;
  custodyMoveId?: string | null;
}

const missing = (field: string) =>
  new AppError(400, "unknown_target", `That ${field.replace(/Id$/, "")} is not on this site.`, {
    [field]: "Not on this site",
  });

/**
 * Fills in what a photo belongs to from the most specific id given (inspection →
 * component → position → board), each checked against the site, so a photo can never
 * point at another crew's board.
 */
export async function resolveTarget(db: Db, siteId: string, ids: TargetIds): Promise<Target> {
  const t: Target = { boardId: null, positionId: null, componentId: null, defectId: null, inspectionId: null };
  if (ids.inspectionId) {
    const i = await repo.findInspectionTarget(db, siteId, ids.inspectionId);
    if (!i) throw missing("inspectionId");
    Object.assign(t, {
      inspectionId: i.inspectionId,
      componentId: i.componentId,
      positionId: i.positionId,
      boardId: i.boardId,
    });
  }
  if (ids.custodyMoveId) {
    const m = await repo.findCustodyMoveTarget(db, siteId, ids.custodyMoveId);
    if (!m) throw missing("custodyMoveId");
    Object.assign(t, {
      custodyMoveId: m.custodyMoveId,
      componentId: t.componentId ?? m.componentId,
      positionId: t.positionId ?? m.positionId,
      boardId: t.boardId ?? m.boardId,
    });
  }
  if (ids.defectId) {
    const d = await repo.findDefectTarget(db, siteId, ids.defectId);
    if (!d) throw missing("defectId");
    t.defectId = d.defectId;
    t.boardId ??= d.boardId;
    t.positionId ??= d.positionId;
    t.componentId ??= d.componentId;
  }
  if (ids.componentId && !t.componentId) {
    const c = await repo.findComponentTarget(db, siteId, ids.componentId);
    if (!c) throw missing("componentId");
    Object.assign(t, {
      componentId: c.componentId,
      positionId: t.positionId ?? c.positionId,
      boardId: t.boardId ?? c.boardId,
    });
  }
  if (ids.positionId && !t.positionId) {
    const p = await repo.findPositionTarget(db, siteId, ids.positionId);
    if (!p) throw missing("positionId");
    Object.assign(t, { positionId: p.positionId, boardId: t.boardId ?? p.boardId });
  }
  if (ids.boardId && !t.boardId) {
    if (!(await repo.findBoard(db, siteId, ids.boardId))) throw missing("boardId");
    t.boardId = ids.boardId;
  }
  return t;
}

/** Photographers and curators file photos anywhere; volunteers only to their own inspections and custody moves. */
export async function assertMayAttach(db: Db, siteId: string, user: User, role: Role | "admin", ids: TargetIds) {
  if (can(role, "photos.file")) return;
  if (role === "volunteer" && ids.defectId && !ids.inspectionId && !ids.custodyMoveId) {
    const d = await repo.findDefectTarget(db, siteId, ids.defectId);
    const own = d && (await repo.defectTouchedBy(db, ids.defectId, user.id));
    if (own) return;
    throw forbidden("Volunteers may attach photos to defects they raised, hold or repaired.");
  }
  if (role === "volunteer" && ids.custodyMoveId && !ids.inspectionId) {
    const m = await repo.findCustodyMoveTarget(db, siteId, ids.custodyMoveId);
    if (m && m.movedBy === user.id) return;
    throw forbidden("Volunteers may attach photos to their own inspections and custody moves only.");
  }
  if (role === "volunteer" && ids.inspectionId) {
    const i = await repo.findInspectionTarget(db, siteId, ids.inspectionId);
    if (i && i.inspectorId === user.id) return;
    throw forbidden("Volunteers may attach photos to their own inspections only.");
  }
  throw forbidden(
    role === "volunteer"
      ? "Volunteers may attach photos to their own inspections only."
      : "Only the photographer and the curator upload and file photos.",
  );
}
