/**
 * A line's status moves and what they do to the register:
 * - received: each component the line is for goes to custody "ready to refit" (the part for
 *   that position is in hand and inspected) — one custody move each, audited;
 * - fitted: each such component goes to "refitted", its heritage becomes what the form says the
 *   fitted part is (period / modern) unless "unchanged" (a sub-part fitted into the original);
 *   each linked defect still being worked moves to "awaiting re-test" with its parts in hand;
 *   the links become fitted (history) so the register's demand counts as met.
 */
import { sql } from "kysely";
import { canMovePart, defaultFittedHeritage } from "../../src/domain/part-workflow";
import { PART_STATUS_LABELS, type Custody } from "../../src/domain/vocab";
import { acquisitionBody, type statusBody } from "../../src/schemas/parts";
import type { z } from "zod";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, conflict } from "../errors";
import * as repo from "./repository";
import { lineRow, lockedLine } from "./rows";

type Body = z.infer<typeof statusBody>;
const WORKING_DEFECT = ["raised", "scheduled", "under_repair", "deferred"] as const;

export async function moveLineStatus(db: Db, siteId: string, lineId: string, b: Body, actorId: string) {
  await db.transaction().execute(async (trx) => {
    const line = await lockedLine(trx, siteId, lineId, b.version);
    if (!canMovePart(line.status, b.to))
      throw conflict(
        `A line that is ${PART_STATUS_LABELS[line.status].toLowerCase()} cannot move to ${PART_STATUS_LABELS[b.to].toLowerCase()}.`,
        await lineRow(trx, siteId, lineId),
      );
    if (b.to === "acquired" && line.status !== "received")
      await needAcquisition(trx, siteId, lineId, b.acquisition, actorId);
    const links = await trx
      .selectFrom("partDemandLinks")
      .selectAll()
      .where("lineId", "=", lineId)
      .where("active", "=", true)
      .execute();
    if (b.to === "received")
      for (const l of links)
        if (l.componentId)
          await moveCustody(
            trx,
            siteId,
            l.componentId,
            "ready_to_refit",
            `Replacement part received (wanted-list line)`,
            actorId,
          );
    if (b.to === "fitted") await fit(trx, siteId, links, b.heritageAfter ?? defaultFittedHeritage(line), actorId);
    await repo.updateLine(trx, lineId, {
      status: b.to,
      cancelReason: b.to === "cancelled" ? b.reason : "",
      autoCancelled: false,
      ...(b.to === "fitted" ? { fittedAt: new Date() } : {}),
    });
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
  });
  return lineRow(db, siteId, lineId, true);
}

async function needAcquisition(trx: Db, siteId: string, lineId: string, a: unknown, actorId: string) {
  if (a) return insertAcquisition(trx, siteId, lineId, acquisitionBody.parse(a), actorId);
  const has = await trx.selectFrom("partAcquisitions").select("id").where("lineId", "=", lineId).executeTakeFirst();
  if (!has)
    throw new AppError(400, "invalid_input", "Record what the part cost and when it was acquired.", {
      "acquisition.cost": "Required",
      "acquisition.acquiredOn": "Required",
    });
}

async function moveCustody(
  trx: Db,
  siteId: string,
  componentId: string,
  to: Custody,
  note: string,
  actorId: string,
  extra: { heritage?: "period" | "modern" } = {},
) {
  const c = await trx
    .selectFrom("components")
    .select(["id", "custody", "heritage", "positionId", "custodyLocation"])
    .where("id", "=", componentId)
    .where("siteId", "=", siteId)
    .forUpdate()
    .executeTakeFirst();
  if (!c) return;
  const heritageChanges = extra.heritage && extra.heritage !== c.heritage;
  if (c.custody === to && !heritageChanges) return;
  await trx
    .updateTable("components")
    .set({
      custody: to,
      ...(heritageChanges ? { heritage: extra.heritage } : {}),
      version: sql`version + 1`,
      updatedAt: sql`now()`,
    })
    .where("id", "=", componentId)
    .execute();
  if (c.custody !== to)
    await trx
      .insertInto("custodyMoves")
      .values({
        siteId,
        componentId,
        fromState: c.custody,
        toState: to,
        location: c.custodyLocation,
        note,
        movedBy: actorId,
      })
      .execute();
  const board = await trx.selectFrom("positions").select("boardId").where("id", "=", c.positionId).executeTakeFirst();
  await recordAudit(trx, {
    siteId,
    entityType: "component",
    entityId: componentId,
    action: "parts_update",
    actorId,
    positionId: c.positionId,
    boardId: board?.boardId ?? null,
    before: { custody: c.custody, ...(heritageChanges ? { heritage: c.heritage } : {}) },
    after: { custody: to, ...(heritageChanges ? { heritage: extra.heritage } : {}) },
  });
}

type Link = { id: string; componentId: string | null; defectId: string | null };

async function fit(
  trx: Db,
  siteId: string,
  links: Link[],
  heritageAfter: "unchanged" | "period" | "modern",
  actorId: string,
) {
  const heritage = heritageAfter === "unchanged" ? undefined : heritageAfter;
  for (const l of links) {
    if (l.componentId)
      await moveCustody(trx, siteId, l.componentId, "refitted", "Part from the wanted list fitted", actorId, {
        heritage,
      });
    if (l.defectId) await defectAwaitsVerification(trx, siteId, l.defectId, actorId);
  }
  if (links.length)
    await trx
      .updateTable("partDemandLinks")
      .set({ fitted: true, active: false, fittedAt: sql`now()` })
      .where(
        "id",
        "in",
        links.map((l) => l.id),
      )
      .execute();
}

async function defectAwaitsVerification(trx: Db, siteId: string, defectId: string, actorId: string) {
  const d = await trx
    .selectFrom("defects")
    .select(["id", "status", "partsState", "positionId", "boardId"])
    .where("id", "=", defectId)
    .where("siteId", "=", siteId)
    .forUpdate()
    .executeTakeFirst();
  if (!d || !(WORKING_DEFECT as readonly string[]).includes(d.status)) return;
  await trx
    .updateTable("defects")
    .set({
      status: "awaiting_retest",
      partsState: "in_hand",
      repairedBy: actorId,
      statusReason: "Part from the wanted list fitted",
      version: sql`version + 1`,
      updatedAt: sql`now()`,
    })
    .where("id", "=", defectId)
    .execute();
  await recordAudit(trx, {
    siteId,
    entityType: "defect",
    entityId: defectId,
    action: "status",
    actorId,
    positionId: d.positionId,
    boardId: d.boardId,
    before: { status: d.status, partsState: d.partsState },
    after: { status: "awaiting_retest", partsState: "in_hand" },
  });
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
    const lead = await trx
      .selectFrom("partLeads")
      .select(["id", "status"])
      .where("id", "=", a.leadId)
      .where("lineId", "=", lineId)
      .executeTakeFirst();
    if (!lead)
      throw new AppError(400, "invalid_input", "That lead is not one of this line's leads.", {
        leadId: "Not a lead of this line",
      });
    await trx
      .updateTable("partLeads")
      .set({ status: "secured", version: sql`version + 1`, updatedAt: sql`now()` })
      .where("id", "=", a.leadId)
      .execute();
  }
  const row = await trx
    .insertInto("partAcquisitions")
    .values({
      siteId,
      lineId,
      leadId: a.leadId,
      qty: a.qty,
      cost: a.cost,
      acquiredOn: a.acquiredOn,
      notes: a.notes,
      recordedBy: actorId,
    })
    .returningAll()
    .executeTakeFirstOrThrow();
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
