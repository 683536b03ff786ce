import type { ExportWriter } from "../export-stream";
import { toCsv } from "./csv";
import { needKey, nextPartStatuses } from "../../src/domain/part-workflow";
import { can } from "../../src/domain/permissions";
import type { Role } from "../../src/domain/vocab";
import type { createLineBody, leadBody, updateLeadBody, updateLineBody } from "../../src/schemas/parts";
import type { z } from "zod";
import { diff, recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, conflict, forbidden, notFound } from "../errors";
import { refreshBudget } from "./budget-repository";
import { lineSpec, reconcileDemand, syncDemand } from "./demand";
import * as repo from "./repository";
import { buildRows, lineRow, lockedLine, pageRows, siteBudget } from "./rows";
import { LINKS_IN_ROW } from "../../src/schemas/parts";

export { reconcileDemand, syncDemand } from "./demand";
export { rebuildBudget } from "./budget-repository";
export { lineRow } from "./rows";

type Actor = { id: string; role: Role | "admin" };

/**
 * Called by the inventory and defects services in the transaction that changed dispositions,
 * nameplates or defects' parts: brings the wanted list in line for just those sources. The list
 * itself never reconciles on a read.
 */
export const demandChanged = (
  trx: Db,
  siteId: string,
  scope: { componentIds?: readonly string[]; defectIds?: readonly string[]; lineIds?: readonly string[] },
  actorId: string | null,
) => syncDemand(trx, siteId, scope, actorId);

/**
 * The site's demand lock, taken early by a writer of the register that will call `demandChanged` later in
 * its transaction: after the register rows it locks (components, then defects) and before it writes them.
 * A defect's write moves its board × status × severity tally row (`defect_tallies`, a trigger), and a
 * fitting move (which holds the demand lock) writes its defects' tally rows; a writer that held a tally row
 * while it waited for the demand lock could deadlock with it (DEVELOPERS.md, "Lock order of the wanted
 * list's writers"). Re-entrant: `demandChanged` takes it again at no cost.
 */
export const holdDemand = (trx: Db, siteId: string) => repo.lockSiteParts(trx, siteId);

/**
 * The components and defects whose demand is active on a position, and the lines of every link on it
 * (a fitted one too), read before the position is deleted: its component's links go with it, so
 * those lines' budget is counted again afterwards.
 */
export async function demandOfPosition(trx: Db, siteId: string, positionId: string) {
  const rows = await repo.demandLinksOfPosition(trx, siteId, positionId);
  const active = rows.filter((r) => r.active);
  return {
    componentIds: active.flatMap((r) => (r.componentId ? [r.componentId] : [])),
    defectIds: active.flatMap((r) => (r.defectId ? [r.defectId] : [])),
    lineIds: [...new Set(rows.map((r) => r.lineId))],
  };
}

export const DEFAULT_PAGE_SIZE = 50;

/**
 * One page of the list with the filter's total, the site's budget and boards: four statements whatever the
 * page's size or its lines' links (the page with each row's counts and first LINKS_IN_ROW positions, the count,
 * the boards and the kept budget).
 */
export async function listParts(db: Db, siteId: string, filter: repo.LineFilter & { page?: number; size?: number }) {
  const size = filter.size ?? DEFAULT_PAGE_SIZE;
  const page = filter.page ?? 1;
  const boardsRead = repo.boardsOfSite(db, siteId);
  const [lines, total, budget, boards] = await Promise.all([
    repo.pageOfLines(db, siteId, { filter, limit: size, offset: (page - 1) * size }, LINKS_IN_ROW).then(pageRows),
    repo.countLines(db, siteId, filter),
    siteBudget(db, siteId, boardsRead),
    boardsRead,
  ]);
  return { lines, total, page, size, budget, boards };
}

/** Every line of the filter (CSV), built 500 lines at a time. */
export async function* allLines(db: Db, siteId: string, filter: repo.LineFilter) {
  for (let offset = 0; ; offset += 500) {
    const page = await repo.listLines(db, siteId, filter, { limit: 500, offset });
    if (page.length) yield await buildRows(db, page);
    if (page.length < 500) return;
  }
}

/**
 * The wanted list's CSV into any export writer (a response, or a file made by a background job):
 * read 500 lines at a time into memory (a site has hundreds to a few thousand lines; no connection
 * is held while the writer waits), then written in 64 kB pieces with the writer's back-pressure.
 */
export async function writePartsCsv(
  db: Db,
  siteId: string,
  filter: repo.LineFilter,
  timeZone: string,
  out: ExportWriter,
) {
  const lines = [];
  for await (const part of allLines(db, siteId, filter)) lines.push(...part);
  out.progress?.(0, lines.length);
  const csv = Buffer.from(toCsv(lines, timeZone), "utf8");
  for (let i = 0; i < csv.length; i += 64 * 1024) await out.write(csv.subarray(i, i + 64 * 1024));
  out.progress?.(lines.length, lines.length);
}

/** A page of one line's links, withdrawn ones too (404 when the line is not the site's). */
export async function lineLinks(db: Db, siteId: string, lineId: string, q: { page: number; size: number }) {
  const [links, total] = await Promise.all([
    repo.linksOfLinePage(db, siteId, lineId, { limit: q.size, offset: (q.page - 1) * q.size }),
    repo.countLinksOfLine(db, siteId, lineId),
  ]);
  if (total === null) throw notFound("That wanted-list line");
  return {
    links: links.map((l) => ({
      linkId: l.id,
      positionId: l.positionId,
      designation: l.designation,
      boardId: l.boardId,
      boardName: l.boardName,
      componentId: l.componentId,
      defectId: l.defectId,
      defectTitle: l.defectTitle,
      qty: l.qty,
      state: l.fitted ? ("fitted" as const) : l.active ? ("active" as const) : ("withdrawn" as const),
    })),
    total,
    page: q.page,
    size: q.size,
  };
}

export async function lineDetail(db: Db, siteId: string, lineId: string) {
  const line = await lineRow(db, siteId, lineId);
  const [leads, acquisitions, history] = await Promise.all([
    repo.leadsOfLine(db, lineId),
    repo.acquisitionsOfLine(db, lineId),
    repo.historyOfLine(db, lineId),
  ]);
  return {
    line,
    leads: leads.map((l) => ({ ...l, createdAt: l.createdAt.toISOString() })),
    acquisitions,
    history: history.map((h) => ({ ...h, at: h.at.toISOString() })),
    nextStatuses: [...nextPartStatuses(line.status)],
  };
}

export async function createManualLine(db: Db, siteId: string, b: z.infer<typeof createLineBody>, actor: Actor) {
  if (b.heritageRule && !can(actor.role, "parts.heritage_rule"))
    throw forbidden("Only the curator sets a line's heritage rule.");
  return db.transaction().execute(async (trx) => {
    const spec = { ...b, mustMatch: b.mustMatch ?? undefined };
    const line = await repo.insertLine(trx, {
      siteId,
      origin: "manual",
      kind: b.kind,
      ratingAmps: b.ratingAmps,
      poles: b.poles,
      voltageRating: b.voltageRating,
      frame: b.frame,
      mounting: b.mounting,
      maker: b.maker,
      model: b.model,
      need: b.need,
      mustMatch: b.mustMatch,
      specKey: needKey(spec, b.need),
      manualQty: b.qty,
      notes: b.notes,
      estimatedUnitCost: b.estimatedUnitCost,
      heritageRule: b.heritageRule,
      createdBy: actor.id,
    });
    await repo.addHistory(trx, {
      siteId,
      lineId: line.id,
      action: "created",
      summary: `Added by hand (${b.qty} wanted)`,
      toStatus: "wanted",
      actorId: actor.id,
    });
    await recordAudit(trx, {
      siteId,
      entityType: "part_line",
      entityId: line.id,
      action: "create",
      actorId: actor.id,
      after: line,
    });
    await refreshBudget(trx, siteId, [line.id]);
    return line.id;
  });
}

export async function updateLine(
  db: Db,
  siteId: string,
  lineId: string,
  b: z.infer<typeof updateLineBody>,
  actorId: string,
) {
  await db.transaction().execute(async (trx) => {
    await repo.lockSiteParts(trx, siteId); // before the line: a changed spec syncs the site's demand (lock order in workflow.ts)
    const line = await lockedLine(trx, siteId, lineId, b.version);
    const { version: _v, ...patch } = b;
    if (patch.manualQty !== undefined && line.origin === "manual" && patch.manualQty < 1)
      throw new AppError(400, "invalid_input", "A line added by hand needs a quantity of at least 1.", {
        manualQty: "At least 1",
      });
    const next = { ...line, ...patch };
    const specKey = needKey(lineSpec(next), next.need);
    const d = diff(line as unknown as Record<string, unknown>, { ...patch, specKey });
    if (!d.changed) return;
    await repo.updateLine(trx, lineId, { ...patch, specKey });
    await repo.addHistory(trx, {
      siteId,
      lineId,
      action: "edited",
      summary: `Changed ${Object.keys(d.after)
        .filter((k) => k !== "specKey")
        .join(", ")}`,
      actorId,
    });
    await recordAudit(trx, {
      siteId,
      entityType: "part_line",
      entityId: lineId,
      action: "update",
      actorId,
      before: d.before,
      after: d.after,
    });
    if (specKey !== line.specKey) await reconcileDemand(trx, siteId, actorId); // a changed spec may gain or shed positions
    await refreshBudget(trx, siteId, [lineId]); // quantity or unit cost
  });
  return lineRow(db, siteId, lineId);
}

export async function setHeritageRule(
  db: Db,
  siteId: string,
  lineId: string,
  b: { version: number; heritageRule: repo.LineRecord["heritageRule"] },
  actorId: string,
) {
  await db.transaction().execute(async (trx) => {
    const line = await lockedLine(trx, siteId, lineId, b.version);
    if (line.heritageRule === b.heritageRule) return;
    await repo.updateLine(trx, lineId, { heritageRule: b.heritageRule });
    await repo.addHistory(trx, {
      siteId,
      lineId,
      action: "heritage_rule",
      summary: `Heritage rule set to ${b.heritageRule.replace("_", " ")}`,
      actorId,
    });
    await recordAudit(trx, {
      siteId,
      entityType: "part_line",
      entityId: lineId,
      action: "heritage_rule",
      actorId,
      before: { heritageRule: line.heritageRule },
      after: { heritageRule: b.heritageRule },
    });
  });
  return lineRow(db, siteId, lineId);
}

export async function addLead(db: Db, siteId: string, lineId: string, b: z.infer<typeof leadBody>, actorId: string) {
  return db.transaction().execute(async (trx) => {
    const line = await repo.findLine(trx, siteId, lineId, true);
    if (!line) throw notFound("That wanted-list line");
    const lead = await repo.insertLead(trx, { ...b, siteId, lineId, createdBy: actorId });
    await repo.addHistory(trx, {
      siteId,
      lineId,
      action: "lead_added",
      summary: `Lead recorded: ${lead.source}`,
      actorId,
    });
    await recordAudit(trx, {
      siteId,
      entityType: "part_lead",
      entityId: lead.id,
      action: "create",
      actorId,
      after: lead,
    });
    if (line.status === "wanted") {
      await repo.updateLine(trx, lineId, { status: "lead_found" });
      await repo.addHistory(trx, {
        siteId,
        lineId,
        action: "status",
        summary: "A lead was recorded",
        fromStatus: "wanted",
        toStatus: "lead_found",
        actorId,
      });
    }
    return lead;
  });
}

export async function updateLead(
  db: Db,
  siteId: string,
  leadId: string,
  b: z.infer<typeof updateLeadBody>,
  actorId: string,
) {
  return db.transaction().execute(async (trx) => {
    const lead = await repo.lockLead(trx, siteId, leadId);
    if (!lead) throw notFound("That lead");
    if (lead.version !== b.version)
      throw conflict("Someone changed this lead since you opened it.", {
        ...lead,
        createdAt: lead.createdAt.toISOString(),
      });
    const { version: _v, ...patch } = b;
    const d = diff(lead as unknown as Record<string, unknown>, patch);
    if (!d.changed) return lead;
    const next = await repo.updateLeadRow(trx, leadId, patch);
    await repo.addHistory(trx, {
      siteId,
      lineId: lead.lineId,
      action: "lead_edited",
      summary: `Lead ${next.source}: changed ${Object.keys(d.after).join(", ")}`,
      actorId,
    });
    await recordAudit(trx, {
      siteId,
      entityType: "part_lead",
      entityId: leadId,
      action: "update",
      actorId,
      before: d.before,
      after: d.after,
    });
    return next;
  });
}
