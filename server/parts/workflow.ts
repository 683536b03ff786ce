/**
 * A line's status moves and what they do to the register. The parts domain writes only its own
 * tables; components and defects change through their owners' services, in this transaction:
 * - received: each component the line is for goes to custody "ready to refit" (the part for
 *   that position is in hand and inspected) — inventory's `moveCustodyFor`, one custody move each;
 * - fitted: each such component goes to "refitted", its heritage becomes what the form says the
 *   fitted part is (period / modern) unless "unchanged" (a sub-part fitted into the original);
 *   each linked defect gets its parts in hand and, where the defect workflow lets this person
 *   move it, goes on to "awaiting re-test" — the defect service's `partFitted` → `transition`;
 *   the links become fitted (history) so the register's demand counts as met.
 * The defect notices that causes are returned for the route to send after the commit.
 */
import { canMovePart, defaultFittedHeritage } from "../../src/domain/part-workflow";
import type { Actor } from "../../src/domain/defect-workflow";
import { PART_STATUS_LABELS } from "../../src/domain/vocab";
import { acquisitionBody, type statusBody } from "../../src/schemas/parts";
import type { z } from "zod";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, conflict } from "../errors";
import * as repo from "./repository";
import { lineRow, lockedLine } from "./rows";
import * as defects from "../defects/service";
import { holdBudget, refreshBudget } from "./budget-repository";
import { syncDemand } from "./demand";
import { lockComponentsFor, moveCustodyFor } from "../inventory/survey-service";

type Body = z.infer<typeof statusBody>;

export async function moveLineStatus(db: Db, siteId: string, lineId: string, b: Body, actor: Actor) {
  const actorId = actor.id;
  const ctx: defects.Ctx = { siteId, actor, notices: [] };
  await db.transaction().execute(async (trx) => {
    await lockInOrder(trx, siteId, lineId, b.to);
    const line = await lockedLine(trx, siteId, lineId, b.version);
    await holdBudget(trx, siteId); // before the custody moves and their board summaries (see holdBudget)
    if (!canMovePart(line.status, b.to))
      throw conflict(
        `A line that is ${PART_STATUS_LABELS[line.status].toLowerCase()} cannot move to ${PART_STATUS_LABELS[b.to].toLowerCase()}.`,
        await lineRow(trx, siteId, lineId),
      );
    if (b.to === "acquired" && line.status !== "received")
      await needAcquisition(trx, siteId, lineId, b.acquisition, actorId);
    const links = await repo.activeLinksOfLine(trx, lineId);
    if (b.to === "received")
      for (const l of links)
        if (l.componentId)
          await moveCustodyFor(trx, siteId, l.componentId, actorId, {
            toState: "ready_to_refit",
            note: "Replacement part received (wanted-list line)",
            because: "The replacement part from the wanted list was received.",
          });
    if (b.to === "fitted") await fit(trx, ctx, links, b.heritageAfter ?? defaultFittedHeritage(line));
    await repo.updateLine(trx, lineId, {
      status: b.to,
      cancelReason: b.to === "cancelled" ? b.reason : "",
      autoCancelled: false,
      ...(b.to === "fitted" ? { fittedAt: new Date() } : {}),
    });
    const defectIds = b.to === "fitted" ? links.flatMap((l) => (l.defectId ? [l.defectId] : [])) : [];
    if (defectIds.length) await syncDemand(trx, siteId, { defectIds }, actorId); // the defects' parts state moved
    const summary =
      b.to === "cancelled" ? `Cancelled: ${b.reason}` : b.note || `Moved to ${PART_STATUS_LABELS[b.to].toLowerCase()}`;
    await repo.addHistory(trx, {
      siteId,
      lineId,
      action: "status",
      summary,
      fromStatus: line.status,
      toStatus: b.to,
      actorId,
    });
    await recordAudit(trx, {
      siteId,
      entityType: "part_line",
      entityId: lineId,
      action: "status",
      actorId,
      before: { status: line.status },
      after: { status: b.to },
    });
    await refreshBudget(trx, siteId, [lineId]); // its status, fitted links or acquisitions
  });
  return { line: await lineRow(db, siteId, lineId), ctx };
}

/**
 * The wanted list's lock order, shared by every writer of it: the register's rows a write changes
 * (components, then defects, each in id order), then the site's demand lock (`lockSiteParts`), then
 * line rows, then the budget lock (`holdBudget`), then the boards' summary locks. A disposition
 * change holds its component and then syncs the demand (demand lock → lines → budget); a status move
 * used to take its line and the budget lock first and its components last, so the two could wait on
 * each other in a circle. Now the move takes the components (and, to fit, the defects — the links' and
 * the components' own) its line's links name before anything else, and the two wait in line instead.
 * The links are read unlocked to know what to lock; they change only under the demand lock, so a link
 * added between that read and the demand lock (rare) has its component taken later, out of order, as
 * before. Rows are locked FOR NO KEY UPDATE (the lock their UPDATE takes anyway), so a writer past the
 * demand lock that only names one of them (a foreign key) never waits for it.
 */
async function lockInOrder(trx: Db, siteId: string, lineId: string, to: Body["to"]) {
  if (to === "received" || to === "fitted") {
    const links = await repo.activeLinksOfLine(trx, lineId);
    await lockComponentsFor(
      trx,
      siteId,
      links.flatMap((l) => (l.componentId ? [l.componentId] : [])),
    );
    // To fit: the linked defects, and every defect of the linked components (a fitted part can change its
    // component's heritage, which re-ranks them), all in one id order.
    if (to === "fitted")
      await defects.lockDefectsFor(trx, siteId, {
        ids: links.flatMap((l) => (l.defectId ? [l.defectId] : [])),
        componentIds: links.flatMap((l) => (l.componentId ? [l.componentId] : [])),
      });
  }
  await repo.lockSiteParts(trx, siteId);
}

async function needAcquisition(trx: Db, siteId: string, lineId: string, a: unknown, actorId: string) {
  if (a) return insertAcquisition(trx, siteId, lineId, acquisitionBody.parse(a), actorId);
  if (!(await repo.hasAcquisition(trx, lineId)))
    throw new AppError(400, "invalid_input", "Record what the part cost and when it was acquired.", {
      "acquisition.cost": "Required",
      "acquisition.acquiredOn": "Required",
    });
}

type Link = { id: string; componentId: string | null; defectId: string | null };

async function fit(trx: Db, ctx: defects.Ctx, links: Link[], heritageAfter: "unchanged" | "period" | "modern") {
  const heritage = heritageAfter === "unchanged" ? undefined : heritageAfter;
  for (const l of links) {
    if (l.componentId)
      await moveCustodyFor(trx, ctx.siteId, l.componentId, ctx.actor.id, {
        toState: "refitted",
        note: "Part from the wanted list fitted",
        because: "The part from the wanted list was fitted.",
        heritage,
      });
    if (l.defectId) await defects.partFitted(trx, ctx, l.defectId, "Part from the wanted list fitted");
  }
  if (links.length)
    await repo.markLinksFitted(
      trx,
      links.map((l) => l.id),
    );
}

/** Records a purchase on the line (cost, date, optionally the lead it came from, which is then secured). */
export async function insertAcquisition(
  trx: Db,
  siteId: string,
  lineId: string,
  a: z.infer<typeof acquisitionBody>,
  actorId: string,
) {
  if (a.leadId) {
    const lead = await repo.leadOfLine(trx, a.leadId, lineId);
    if (!lead)
      throw new AppError(400, "invalid_input", "That lead is not one of this line's leads.", {
        leadId: "Not a lead of this line",
      });
    await repo.secureLead(trx, a.leadId);
  }
  const row = await repo.insertAcquisitionRow(trx, {
    siteId,
    lineId,
    leadId: a.leadId,
    qty: a.qty,
    cost: a.cost,
    acquiredOn: a.acquiredOn,
    notes: a.notes,
    recordedBy: actorId,
  });
  await repo.addHistory(trx, {
    siteId,
    lineId,
    action: "acquired",
    summary: `Acquired ${a.qty} on ${a.acquiredOn}`,
    actorId,
  });
  await recordAudit(trx, {
    siteId,
    entityType: "part_acquisition",
    entityId: row.id,
    action: "create",
    actorId,
    after: row,
  });
  return row;
}
