import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, forbidden, notFound } from "../errors";
import { can } from "../../src/domain/permissions";
import * as repo from "./repository";
import type { Ctx } from "./service";

/**
 * Pins one defect just above or below another, with the curator's reason. Pins do not
 * chain (the target may not itself be pinned, and a pinned defect's own place is not a
 * target), so the register's SQL order equals rankDefects() of src/domain/priority.ts.
 */
export async function pin(
  db: Db,
  ctx: Ctx,
  id: string,
  b: { direction: "above" | "below"; relativeTo: string; reason: string },
) {
  if (!can(ctx.actor.role, "defects.manage")) throw forbidden("Only the curator pins defects.");
  return db.transaction().execute(async (trx) => {
    const d = await repo.lockDefect(trx, ctx.siteId, id);
    if (!d) throw notFound("That defect");
    const bad = (msg: string) => new AppError(400, "invalid_input", msg, { relativeTo: msg });
    if (b.relativeTo === id) throw bad("A defect cannot be pinned against itself");
    const target = await repo.lockDefect(trx, ctx.siteId, b.relativeTo);
    if (!target) throw bad("That defect is not on this site");
    if (await repo.activePin(trx, b.relativeTo))
      throw bad(`D-${target.ref} is itself pinned; pin against a defect in its own place`);
    if (await repo.isPinTarget(trx, id)) throw bad(`Other defects are pinned against D-${d.ref}; unpin them first`);
    const old = await repo.activePin(trx, id);
    if (old) await repo.removePin(trx, old.id, ctx.actor.id, "Replaced by a new pin");
    const row = await repo.insertPin(trx, {
      siteId: ctx.siteId,
      defectId: id,
      direction: b.direction,
      relativeTo: b.relativeTo,
      reason: b.reason,
      pinnedBy: ctx.actor.id,
    });
    await repo.bumpDefectVersion(trx, id);
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "defect",
      entityId: id,
      action: "pin",
      actorId: ctx.actor.id,
      boardId: d.boardId,
      positionId: d.positionId,
      after: {
        pinId: row.id,
        direction: b.direction,
        relativeTo: b.relativeTo,
        relativeRef: target.ref,
        reason: b.reason,
      },
    });
    return row;
  });
}

export async function unpin(db: Db, ctx: Ctx, id: string, reason: string) {
  if (!can(ctx.actor.role, "defects.manage")) throw forbidden("Only the curator pins and unpins defects.");
  return db.transaction().execute(async (trx) => {
    const d = await repo.lockDefect(trx, ctx.siteId, id);
    if (!d) throw notFound("That defect");
    const old = await repo.activePin(trx, id);
    if (!old) throw notFound("A pin on that defect");
    await repo.removePin(trx, old.id, ctx.actor.id, reason);
    await repo.bumpDefectVersion(trx, id);
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "defect",
      entityId: id,
      action: "unpin",
      actorId: ctx.actor.id,
      boardId: d.boardId,
      positionId: d.positionId,
      before: { pinId: old.id },
      after: { reason },
    });
  });
}
