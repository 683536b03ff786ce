/**
 * Defect use cases. Every assignment goes through assign() and every status change
 * through transition(): the one place each, so notifications can hook in there.
 */
import { sql } from "kysely";
import { recordAudit, diff } from "../audit";
import type { Db } from "../db";
import { AppError, conflict, forbidden, notFound } from "../errors";
import { canEdit, checkTransition, type Actor } from "../../src/domain/defect-workflow";
import { can, rolesFor } from "../../src/domain/permissions";
import { priorityScore, type PriorityInput } from "../../src/domain/priority";
import type { DefectStatus } from "../../src/domain/vocab";
import type { BulkBody, CreateDefectBody, PatchDefectBody } from "../../src/schemas/defects";
import { evidenceOf, linkReading, repairEvidence, type ReadingKind } from "./evidence";
import * as repo from "./repository";
import { demandChanged, holdDemand } from "../parts/service";

export interface Ctx {
  siteId: string;
  actor: Actor;
  /** Filled by assign() and transition(); the route sends them once the transaction has committed. */
  notices?: DefectNotice[];
}
export interface DefectNotice {
  kind: "assigned" | "awaiting_verification";
  defectId: string;
}
type Locked = NonNullable<Awaited<ReturnType<typeof repo.lockDefect>>>;

type Scored = Pick<Locked, "severity" | "safetyCritical" | "blocksEnergisation" | "effortHours" | "partsState">;

/**
 * The priority inputs of a stored defect: its own fields, with original fabric from its linked component's
 * heritage (null when it has no component). effort_hours is numeric, so it arrives as a string.
 */
export const priorityInputOf = (d: Scored, heritage: string | null): PriorityInput => ({
  severity: d.severity,
  safetyCritical: d.safetyCritical,
  blocksEnergisation: d.blocksEnergisation,
  originalFabric: heritage === "original",
  effortHours: d.effortHours === null ? null : Number(d.effortHours),
  partsAvailable: d.partsState,
});

/** priority_score for the stored fields; original fabric comes from the linked component. */
export async function scoreFor(db: Db, siteId: string, d: Scored & Pick<Locked, "componentId">) {
  return priorityScore(priorityInputOf(d, await repo.componentHeritage(db, siteId, d.componentId)));
}

/**
 * A component's heritage changed (inventory calls this in its transaction): the defects linked to
 * it are ranked again, since original fabric weighs in their priority. The caller has locked those
 * defects with `lockDefectsFor(…, { componentIds })` before the site's demand lock: this writes them
 * after it (the wanted list's lock order, DEVELOPERS.md).
 */
export async function componentHeritageChanged(trx: Db, siteId: string, componentIds: string[]) {
  if (!componentIds.length) return;
  for (const d of await repo.defectsOfComponents(trx, siteId, componentIds)) {
    const { score } = priorityScore(priorityInputOf(d, d.heritage));
    if (score !== d.priorityScore) await repo.setPriorityScore(trx, d.id, score);
  }
}

async function current(db: Db, siteId: string, id: string) {
  return repo.findRow(db, siteId, id);
}

/** Locks the defect and checks the caller's version; stale → 409 with the fresh record. */
async function lockAt(db: Db, ctx: Ctx, id: string, version?: number) {
  const d = await repo.lockDefect(db, ctx.siteId, id);
  if (!d) throw notFound("That defect");
  if (version !== undefined && d.version !== version)
    throw conflict(
      "Someone changed this defect since you opened it. Check the current values and try again.",
      await current(db, ctx.siteId, id),
    );
  return d;
}

/** Board, section, position, component and inspection must all be of this site and agree. */
async function resolveLinks(
  db: Db,
  siteId: string,
  b: {
    boardId: string;
    sectionId?: string | null;
    positionId?: string | null;
    componentId?: string | null;
    inspectionId?: string | null;
  },
) {
  const out = {
    boardId: b.boardId,
    sectionId: b.sectionId ?? null,
    positionId: b.positionId ?? null,
    componentId: b.componentId ?? null,
    inspectionId: b.inspectionId ?? null,
  };
  const bad = (field: string, msg: string) => new AppError(400, "invalid_input", msg, { [field]: msg });
  if (out.inspectionId) {
    const i = await repo.findInspection(db, siteId, out.inspectionId);
    if (!i) throw bad("inspectionId", "That inspection is not on this site");
    out.positionId ??= i.positionId;
    out.componentId ??= i.componentId;
  }
  if (out.positionId) {
    const p = await repo.findPosition(db, siteId, out.positionId);
    if (!p) throw bad("positionId", "That position is not on this site");
    if (p.boardId !== out.boardId) throw bad("positionId", "That position is on another board");
    out.sectionId ??= p.sectionId;
    out.componentId ??= p.componentId;
  }
  if (out.componentId) {
    const c = await repo.findComponent(db, siteId, out.componentId);
    if (!c) throw bad("componentId", "That component is not on this site");
    if (out.positionId && c.positionId !== out.positionId)
      throw bad("componentId", "That component belongs to another position");
  }
  if (!(await repo.findBoard(db, siteId, out.boardId))) throw bad("boardId", "That board is not on this site");
  if (out.sectionId) {
    const s = await repo.findSection(db, siteId, out.sectionId);
    if (!s || s.boardId !== out.boardId) throw bad("sectionId", "That section is not on this board");
  }
  return out;
}

/**
 * Inserts a defect with its first status and audit entry, inside the caller's transaction. The site's demand
 * lock comes first: the insert writes its board × status × severity tally row, which comes after that lock
 * in the wanted list's lock order (parts/service.ts `holdDemand`), and the caller syncs the wanted list later.
 * The rows it names (board, position, component…) are checked after the lock too: a writer that changes them
 * locks them FOR NO KEY UPDATE, which a foreign-key check does not wait for, and one that deletes them holds
 * the demand lock before it deletes.
 */
async function insertRaised(
  trx: Db,
  ctx: Pick<Ctx, "siteId" | "actor">,
  body: Omit<CreateDefectBody, "assigneeId" | "fromReading">,
  auditAction = "create",
) {
  await holdDemand(trx, ctx.siteId);
  const links = await resolveLinks(trx, ctx.siteId, body);
  const values = { ...body, ...links, siteId: ctx.siteId, createdBy: ctx.actor.id };
  const { score } = await scoreFor(trx, ctx.siteId, { ...values, effortHours: values.effortHours });
  const { id } = await repo.insertDefect(trx, { ...values, priorityScore: score });
  await repo.insertStatusChange(trx, {
    siteId: ctx.siteId,
    defectId: id,
    fromStatus: null,
    toStatus: "raised",
    actorId: ctx.actor.id,
  });
  await recordAudit(trx, {
    siteId: ctx.siteId,
    entityType: "defect",
    entityId: id,
    action: auditAction,
    actorId: ctx.actor.id,
    boardId: links.boardId,
    positionId: links.positionId,
    after: values,
  });
  return id;
}

export async function createDefect(db: Db, ctx: Ctx, body: CreateDefectBody) {
  if (!can(ctx.actor.role, "defects.raise")) throw forbidden("Your role on this site cannot raise defects.");
  if ((body.assigneeId || body.dueOn) && !can(ctx.actor.role, "defects.manage"))
    throw forbidden("Only the curator assigns defects and sets due dates.");
  return db.transaction().execute(async (trx) => {
    const { assigneeId, fromReading, ...rest } = body;
    const id = await insertRaised(trx, ctx, rest); // the demand lock, then its tally row (the wanted list's lock order)
    if (assigneeId) await assign(trx, ctx, await lockAt(trx, ctx, id), assigneeId);
    if (fromReading)
      await linkReading(trx, ctx.siteId, ctx.actor.id, (await lockAt(trx, ctx, id))!, {
        readingKind: fromReading.kind,
        readingId: fromReading.id,
        role: "raised_from",
      });
    await demandChanged(trx, ctx.siteId, { defectIds: [id] }, ctx.actor.id); // parts wanted → the wanted list, in this transaction
    return (await current(trx, ctx.siteId, id))!;
  });
}

/** Links a re-test (or origin) reading to a defect: the curator, or a volunteer who raised, holds or repaired it. */
export async function addReadingLink(
  db: Db,
  ctx: Ctx,
  id: string,
  b: { readingKind: ReadingKind; readingId: string; role: "raised_from" | "retest" },
) {
  return db.transaction().execute(async (trx) => {
    const d = await lockAt(trx, ctx, id);
    const own = [d.createdBy, d.assigneeId, d.repairedBy].includes(ctx.actor.id);
    if (!can(ctx.actor.role, "defects.manage") && !(ctx.actor.role === "volunteer" && own))
      throw forbidden("Only the curator, or the volunteer working on it, links readings to this defect.");
    await linkReading(trx, ctx.siteId, ctx.actor.id, d, b);
    return evidenceOf(trx, ctx.siteId, d);
  });
}

/**
 * An incident defect opened by another domain (return to service) inside ITS transaction:
 * always safety-critical and blocking energisation, open, unassigned, raised in the name of
 * whoever recorded the incident (whatever their role: the incident itself is the finding).
 * Audited as `incident`. Returns the defect's id and reference. Like any raise it takes the site's
 * demand lock before its tally row and brings the wanted list in line in the caller's transaction; a
 * caller that writes rows of its own first (a watch check) calls `holdForRaise` before them.
 */
export async function raiseIncidentDefect(
  trx: Db,
  ctx: Pick<Ctx, "siteId" | "actor">,
  b: {
    boardId: string;
    positionId: string | null;
    title: string;
    description: string;
    category: CreateDefectBody["category"];
    severity?: CreateDefectBody["severity"];
    /** The reading that opened it: linked both ways as "raised from", so the crew sees why it was opened. */
    raisedFrom?: { readingKind: ReadingKind; readingId: string };
  },
) {
  const id = await insertRaised(
    trx,
    ctx,
    {
      boardId: b.boardId,
      positionId: b.positionId,
      sectionId: null,
      componentId: null,
      inspectionId: null,
      title: b.title.slice(0, 200),
      description: b.description.slice(0, 8000),
      category: b.category,
      severity: b.severity ?? "disabling",
      safetyCritical: true,
      blocksEnergisation: true,
      effortHours: null,
      costEstimate: null,
      partsNeeded: "",
      partsState: "none_needed",
      dueOn: null,
    },
    "incident",
  );
  const row = await repo.lockDefect(trx, ctx.siteId, id);
  if (b.raisedFrom)
    await linkReading(
      trx,
      ctx.siteId,
      ctx.actor.id,
      { id, componentId: null, boardId: b.boardId, positionId: b.positionId },
      { ...b.raisedFrom, role: "raised_from" },
    );
  // It asks for no part today; the wanted list follows it by the same rule as every raise.
  await demandChanged(trx, ctx.siteId, { defectIds: [id] }, ctx.actor.id);
  return { id, ref: Number(row!.ref) };
}

/**
 * What a raise takes before it writes (the site's demand lock), for a use case of another domain that writes
 * rows of its own and may then raise a defect in the same transaction (return to service: the watch check, then
 * its incidents). Its rows may name register rows (a position) that a deletion, holding the demand lock, is
 * waiting to delete; taken first, the two wait in line instead of on each other. Re-entrant.
 */
export const holdForRaise = (trx: Db, siteId: string) => holdDemand(trx, siteId);

export async function patchDefect(db: Db, ctx: Ctx, id: string, body: PatchDefectBody) {
  return db.transaction().execute(async (trx) => {
    const d = await lockAt(trx, ctx, id, body.version);
    if (!canEdit(d, ctx.actor))
      throw forbidden("Only the curator, or the volunteer who raised it, can edit this defect.");
    const { version: _v, assigneeId, ...fields } = body;
    if ((assigneeId !== undefined || fields.dueOn !== undefined) && !can(ctx.actor.role, "defects.manage"))
      throw forbidden("Only the curator assigns defects and sets due dates.");
    const links = await resolveLinks(trx, ctx.siteId, {
      boardId: d.boardId,
      sectionId: fields.sectionId !== undefined ? fields.sectionId : d.sectionId,
      positionId: fields.positionId !== undefined ? fields.positionId : d.positionId,
      componentId:
        fields.componentId !== undefined ? fields.componentId : fields.positionId !== undefined ? null : d.componentId,
    });
    const next = { ...d, ...fields, ...links };
    const { score } = await scoreFor(trx, ctx.siteId, next);
    const change = diff(d as Record<string, unknown>, { ...fields, ...links, priorityScore: score });
    let version = d.version;
    if (change.changed) {
      await holdDemand(trx, ctx.siteId); // after the defect, before its tally row (the wanted list's lock order)
      const ok = await repo.updateDefect(trx, id, version, { ...fields, ...links, priorityScore: score });
      if (!ok) throw conflict("Someone changed this defect at the same moment.", await current(trx, ctx.siteId, id));
      version += 1;
      await recordAudit(trx, {
        siteId: ctx.siteId,
        entityType: "defect",
        entityId: id,
        action: "update",
        actorId: ctx.actor.id,
        boardId: d.boardId,
        positionId: next.positionId,
        before: change.before,
        after: change.after,
      });
      await demandChanged(trx, ctx.siteId, { defectIds: [id] }, ctx.actor.id);
    }
    if (assigneeId !== undefined && assigneeId !== d.assigneeId) await assign(trx, ctx, { ...d, version }, assigneeId);
    return (await current(trx, ctx.siteId, id))!;
  });
}

/**
 * Why `userId` may not be the one who repairs a defect — assigned to it, or recorded as having done
 * it on the way to "awaiting re-test" — or null when they may: a member of this site's crew whose
 * role does repair work (`defects.repair` in src/domain/permissions.ts). Both paths ask here.
 */
async function repairerProblem(
  trx: Db,
  ctx: Ctx,
  userId: string,
  field: "assigneeId" | "repairedBy",
  what: string,
): Promise<AppError | null> {
  const role = await repo.memberRole(trx, ctx.siteId, userId);
  if (!role)
    return new AppError(400, "invalid_input", "That person is not on this site's crew.", {
      [field]: "Not on the crew",
    });
  if (!can(role, "defects.repair"))
    return new AppError(
      422,
      "not_a_repairer",
      `That person is a ${role} on this site: ${what} someone whose role does repair work (${rolesFor("defects.repair").join(" or ")}).`,
      { [field]: "Their role does not do repair work" },
    );
  return null;
}

/** THE assignment use case (curator only; the assignee must be on the crew, in a role that does repair work). */
export async function assign(trx: Db, ctx: Ctx, d: Locked, assigneeId: string | null) {
  if (!can(ctx.actor.role, "defects.manage")) throw forbidden("Only the curator assigns defects.");
  if (assigneeId) {
    const problem = await repairerProblem(trx, ctx, assigneeId, "assigneeId", "a defect is assigned to");
    if (problem) throw problem;
  }
  if (assigneeId === d.assigneeId) return d.version;
  const ok = await repo.updateDefect(trx, d.id, d.version, { assigneeId });
  if (!ok) throw conflict("Someone changed this defect at the same moment.", await current(trx, ctx.siteId, d.id));
  await recordAudit(trx, {
    siteId: ctx.siteId,
    entityType: "defect",
    entityId: d.id,
    action: "assign",
    actorId: ctx.actor.id,
    boardId: d.boardId,
    positionId: d.positionId,
    before: { assigneeId: d.assigneeId },
    after: { assigneeId },
  });
  if (assigneeId) ctx.notices?.push({ kind: "assigned", defectId: d.id });
  return d.version + 1;
}

const TRANSITION_STATUS = {
  forbidden: 403,
  reason_required: 400,
  not_allowed: 409,
  same_person: 409,
  no_repairer: 409,
  evidence_required: 422,
} as const;

/** THE status-change use case: checks the workflow rules, records history and audit. */
export async function transition(
  trx: Db,
  ctx: Ctx,
  d: Locked,
  to: DefectStatus,
  opts: { reason?: string; repairedBy?: string | null } = {},
) {
  const r = checkTransition(d, to, ctx.actor, {
    ...opts,
    ...(to === "closed" ? { evidence: await repairEvidence(trx, ctx.siteId, d.id) } : {}),
  });
  if (!r.ok)
    throw new AppError(
      TRANSITION_STATUS[r.code],
      r.code,
      r.message,
      r.code === "reason_required" ? { reason: r.message } : undefined,
    );
  // The person recorded as having done the repair passes the same test as an assignee: a viewer cannot be named as having repaired it.
  if (to === "awaiting_retest" && r.set.repairedBy) {
    const problem = await repairerProblem(
      trx,
      ctx,
      r.set.repairedBy,
      "repairedBy",
      "the repair is recorded as done by",
    );
    if (problem) throw problem;
  }
  const reason = opts.reason?.trim() ?? "";
  const patch = {
    status: to,
    statusReason: reason,
    ...(r.set.repairedBy !== undefined ? { repairedBy: r.set.repairedBy } : {}),
    ...(r.set.verifiedBy !== undefined ? { verifiedBy: r.set.verifiedBy } : {}),
    closedAt: r.set.closed ? sql<Date>`now()` : to === "closed" ? d.closedAt : null,
  };
  const ok = await repo.updateDefect(trx, d.id, d.version, patch);
  if (!ok) throw conflict("Someone changed this defect at the same moment.", await current(trx, ctx.siteId, d.id));
  await repo.insertStatusChange(trx, {
    siteId: ctx.siteId,
    defectId: d.id,
    fromStatus: d.status,
    toStatus: to,
    reason,
    actorId: ctx.actor.id,
  });
  await recordAudit(trx, {
    siteId: ctx.siteId,
    entityType: "defect",
    entityId: d.id,
    action: "status",
    actorId: ctx.actor.id,
    boardId: d.boardId,
    positionId: d.positionId,
    before: { status: d.status },
    after: { status: to, reason, ...r.set },
  });
  if (to === "awaiting_retest") ctx.notices?.push({ kind: "awaiting_verification", defectId: d.id });
  return d.version + 1;
}

/**
 * Locks defects another domain's use case will write later in its transaction — through `partFitted`, by
 * re-ranking them (`componentHeritageChanged`), or by deleting what they are on (a position) — in id order and
 * before that use case takes the site's demand lock (the wanted list's lock order, see server/parts/workflow.ts):
 * these defects, and those of these components or on these positions.
 */
export const lockDefectsFor = (
  trx: Db,
  siteId: string,
  of: { ids?: readonly string[]; componentIds?: readonly string[]; positionIds?: readonly string[] },
) => repo.lockDefects(trx, siteId, of);

/**
 * The part the wanted list sourced for this defect was fitted (the parts workflow, inside ITS
 * transaction): its parts are in hand (priority re-scored, audited), and it moves on to
 * "awaiting re-test" through transition() — history row, audit, the notice — only where the
 * defect workflow lets this person make that move (a defect under repair, moved by the curator
 * or the volunteer doing it). Otherwise its status stays where it is and whoever repairs it
 * moves it on; a part arriving never skips the workflow.
 */
export async function partFitted(trx: Db, ctx: Ctx, defectId: string, note: string) {
  let d = await repo.lockDefect(trx, ctx.siteId, defectId);
  if (!d) return null;
  if (d.partsState !== "in_hand") {
    const { score } = await scoreFor(trx, ctx.siteId, { ...d, partsState: "in_hand" });
    const ok = await repo.updateDefect(trx, d.id, d.version, { partsState: "in_hand", priorityScore: score });
    if (!ok) throw conflict("Someone changed this defect at the same moment.", await current(trx, ctx.siteId, d.id));
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "defect",
      entityId: d.id,
      action: "update",
      actorId: ctx.actor.id,
      boardId: d.boardId,
      positionId: d.positionId,
      before: { partsState: d.partsState, priorityScore: d.priorityScore },
      after: { partsState: "in_hand", priorityScore: score, note },
    });
    d = { ...d, partsState: "in_hand", priorityScore: score, version: d.version + 1 };
  }
  // Moved on only when the person it would record as the repairer may repair (else whoever does it moves it on).
  const doer = checkTransition(d, "awaiting_retest", ctx.actor);
  if (doer.ok && (!doer.set.repairedBy || !(await repairerProblem(trx, ctx, doer.set.repairedBy, "repairedBy", ""))))
    await transition(trx, ctx, d, "awaiting_retest", { reason: note });
  return d.id;
}

export async function moveDefect(
  db: Db,
  ctx: Ctx,
  id: string,
  b: { to: DefectStatus; reason: string; repairedBy?: string | null; version: number },
) {
  return db.transaction().execute(async (trx) => {
    const d = await lockAt(trx, ctx, id, b.version);
    await holdDemand(trx, ctx.siteId); // after the defect, before its tally row (the wanted list's lock order)
    await transition(trx, ctx, d, b.to, b);
    await demandChanged(trx, ctx.siteId, { defectIds: [id] }, ctx.actor.id); // closed / deferred / accepted as is / reopened changes what is wanted
    return (await current(trx, ctx.siteId, id))!;
  });
}

export async function assignDefect(db: Db, ctx: Ctx, id: string, b: { assigneeId: string | null; version: number }) {
  return db.transaction().execute(async (trx) => {
    await assign(trx, ctx, await lockAt(trx, ctx, id, b.version), b.assigneeId);
    return (await current(trx, ctx.siteId, id))!;
  });
}

/** Curator's bulk edit: all or nothing, each defect through the same use case as one at a time. */
export async function bulk(db: Db, ctx: Ctx, b: BulkBody) {
  if (!can(ctx.actor.role, "defects.manage")) throw forbidden("Only the curator can change several defects at once.");
  const ids = [...new Set(b.ids)];
  return db.transaction().execute(async (trx) => {
    const errors: Record<string, string> = {};
    // The defects in id order, then (a status move writes their tally rows and the wanted list) the demand
    // lock: the one order every writer takes them in (the wanted list's lock order, parts/service.ts).
    await repo.lockDefects(trx, ctx.siteId, { ids });
    if (b.action.type === "status") await holdDemand(trx, ctx.siteId);
    for (const id of ids) {
      const d = await repo.lockDefect(trx, ctx.siteId, id);
      if (!d) {
        errors[id] = "Not found on this site";
        continue;
      }
      try {
        if (b.action.type === "assign") await assign(trx, ctx, d, b.action.assigneeId);
        else if (b.action.type === "status") await transition(trx, ctx, d, b.action.to, { reason: b.action.reason });
        else await setDue(trx, ctx, d, b.action.dueOn);
      } catch (e) {
        if (!(e instanceof AppError)) throw e;
        errors[id] = `D-${d.ref}: ${e.message}`;
      }
    }
    if (Object.keys(errors).length)
      throw new AppError(
        409,
        "bulk_rejected",
        `Nothing was changed: ${Object.keys(errors).length} of ${ids.length} defects cannot take that change.`,
        errors,
      );
    if (b.action.type === "status") await demandChanged(trx, ctx.siteId, { defectIds: ids }, ctx.actor.id);
    return { updated: ids.length };
  });
}

async function setDue(trx: Db, ctx: Ctx, d: Locked, dueOn: string | null) {
  if (d.dueOn === dueOn) return;
  await repo.updateDefect(trx, d.id, d.version, { dueOn });
  await recordAudit(trx, {
    siteId: ctx.siteId,
    entityType: "defect",
    entityId: d.id,
    action: "update",
    actorId: ctx.actor.id,
    boardId: d.boardId,
    positionId: d.positionId,
    before: { dueOn: d.dueOn },
    after: { dueOn },
  });
}
