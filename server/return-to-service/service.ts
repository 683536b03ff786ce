/**
 * Return-to-service use cases: the plan, sign-offs (append-only), the energisation log,
 * watch checks, incidents (which open a defect through the defects service in the same
 * transaction) and breaker operations. Tideline records and computes; it never authorises
 * an energisation.
 */
import type { z } from "zod";
import {
  AFTER_ENERGISE_KINDS,
  checkReorder,
  isQualifiedOn,
  QUALIFIED_ONLY_KINDS,
} from "../../src/domain/return-to-service";
import { blockerKey, type HoldPoint } from "../../src/domain/rts-gate";
import { classifyTemperatureRise } from "../../src/domain/thermal";
import { judgeDeviceTime } from "../../src/domain/device-clock";
import { operationsStatus, defaultOperationsBudget } from "../../src/domain/breaker-operations";
import type { Role } from "../../src/domain/vocab";
import type {
  budgetBody,
  CreateStageBody,
  deEnergiseBody,
  incidentBody,
  IncidentKind,
  operationBody,
  PatchStageBody,
  qualifiedBody,
  restartBody,
  settingsBody,
  signBody,
  stepBody,
  patchStepBody,
  supersedeBody,
  watchCheckBody,
  EvidenceItem,
  QualifiedPerson,
  RtsOverviewBoard,
} from "../../src/schemas/return-to-service";
import { can, type Action } from "../../src/domain/permissions";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { holdForRaise, raiseIncidentDefect } from "../defects/service";
import { AppError, conflict, forbidden, notFound } from "../errors";
import { siteToday } from "../sites/reads";
import * as repo from "./repository";
import { boardView, loadSettings } from "./view";

export interface Ctx {
  siteId: string;
  actor: { id: string; role: Role | "admin" };
}
type Trx = Db;
type StageRow = NonNullable<Awaited<ReturnType<typeof repo.findStage>>>;
const invalid = (field: string, message: string) => new AppError(400, "invalid_input", message, { [field]: message });
const must = (ctx: Ctx, action: Action, message: string) => {
  if (!can(ctx.actor.role, action)) throw forbidden(message);
};
const isPgUnique = (e: unknown) => (e as { code?: string })?.code === "23505";

async function stageOrThrow(db: Db, ctx: Ctx, stageId: string, lock = false) {
  const s = lock ? await repo.lockStage(db, ctx.siteId, stageId) : await repo.findStage(db, ctx.siteId, stageId);
  if (!s) throw notFound("That stage");
  return s;
}
/** The stage as the board view shows it now (for 409 answers and responses). */
/**
 * Each board of the site with its stages and where it stands. A board without a plan costs nothing
 * here; a planned board's states come from its full view (the gate needs its evidence), two boards
 * at a time so that one overview does not take the whole pool.
 */
export async function siteOverview(db: Db, siteId: string, now = new Date()): Promise<RtsOverviewBoard[]> {
  const [boards, planned] = await Promise.all([repo.listBoards(db, siteId), repo.listPlannedBoardIds(db, siteId)]);
  const views = new Map<string, Awaited<ReturnType<typeof boardView>>>();
  for (let i = 0; i < planned.length; i += 2)
    await Promise.all(planned.slice(i, i + 2).map(async (id) => views.set(id, await boardView(db, siteId, id, now))));
  return boards.map((b) => {
    const v = views.get(b.id);
    const list = v?.stages ?? [];
    const current = list.find((s) => s.status !== "released") ?? null;
    return {
      boardId: b.id,
      boardName: b.name,
      stages: list.length,
      released: list.filter((s) => s.status === "released").length,
      current: current && {
        id: current.id,
        name: current.name,
        state: current.gate.state,
        blockers: current.gate.blockers.length,
      },
      overdue: list.some((s) => !!s.watch?.overdueSince),
      sequence: list.map((s) => ({ id: s.id, name: s.name, state: s.gate.state, blockers: s.gate.blockers.length })),
    };
  });
}

export async function stageView(db: Db, siteId: string, boardId: string, stageId: string, now = new Date()) {
  const v = await boardView(db, siteId, boardId, now);
  return v.stages.find((s) => s.id === stageId) ?? null;
}

/** A stage of the site as the board view shows it now; 404 when the site has no such stage. */
export async function stageOf(db: Db, siteId: string, stageId: string, now = new Date()) {
  const s = await repo.findStage(db, siteId, stageId);
  if (!s) throw new AppError(404, "not_found", "That stage was not found.");
  return stageView(db, siteId, s.boardId, stageId, now);
}

// ---------------- settings and qualified persons ----------------
export async function saveSettings(db: Db, ctx: Ctx, body: z.infer<typeof settingsBody>) {
  must(ctx, "rts.plan", "Only the curator edits the hold-point template.");
  return db.transaction().execute(async (trx) => {
    const before = await loadSettings(trx, ctx.siteId);
    if (body.version !== before.version)
      throw conflict("Someone changed the template since you opened it. Here it is now.", before);
    const values = {
      insulationMaxAgeDays: body.insulationMaxAgeDays,
      template: JSON.stringify(body.template),
      updatedBy: ctx.actor.id,
    };
    const saved =
      before.version === 0
        ? await repo.insertSettings(trx, { siteId: ctx.siteId, ...values })
        : await repo.updateSettings(trx, ctx.siteId, body.version, values);
    if (!saved)
      throw conflict(
        "Someone changed the template at the same moment. Here it is now.",
        await loadSettings(trx, ctx.siteId),
      );
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_settings",
      entityId: ctx.siteId,
      action: "update",
      actorId: ctx.actor.id,
      before,
      after: body,
    });
    return loadSettings(trx, ctx.siteId);
  });
}

export async function qualifiedCrew(db: Db, siteId: string, today: string): Promise<QualifiedPerson[]> {
  return (await repo.listCrew(db, siteId)).map((m) => ({
    userId: m.userId,
    name: m.name,
    email: m.email,
    role: m.role,
    qualification: m.qualification,
    expiresOn: m.expiresOn,
    version: m.version ?? 0,
    current: m.qualification != null && isQualifiedOn({ expiresOn: m.expiresOn }, today),
    suspended: !!m.suspendedAt,
  }));
}

export async function saveQualified(
  db: Db,
  ctx: Ctx,
  userId: string,
  body: z.infer<typeof qualifiedBody>,
  today: string,
) {
  must(ctx, "rts.manage_qualified", "Only the curator records qualified persons.");
  return db.transaction().execute(async (trx) => {
    if (!(await repo.memberRole(trx, ctx.siteId, userId))) throw notFound("That crew member");
    const existing = await repo.getQualified(trx, ctx.siteId, userId);
    const current = async () => (await qualifiedCrew(trx, ctx.siteId, today)).find((q) => q.userId === userId);
    const values = { qualification: body.qualification, expiresOn: body.expiresOn, updatedBy: ctx.actor.id };
    let saved;
    if (!existing) {
      if (body.version !== 0) throw conflict("That qualification was removed since you opened it.", await current());
      saved = await repo.insertQualified(trx, { siteId: ctx.siteId, userId, ...values });
    } else
      saved =
        body.version === existing.version
          ? await repo.updateQualified(trx, ctx.siteId, userId, existing.version, values)
          : undefined;
    if (!saved)
      throw conflict("Someone changed this qualification since you opened it. Here it is now.", await current());
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_qualified_person",
      entityId: userId,
      action: existing ? "update" : "create",
      actorId: ctx.actor.id,
      before: existing ?? null,
      after: values,
    });
    return (await current())!;
  });
}

export async function removeQualified(db: Db, ctx: Ctx, userId: string) {
  must(ctx, "rts.manage_qualified", "Only the curator records qualified persons.");
  await db.transaction().execute(async (trx) => {
    const existing = await repo.getQualified(trx, ctx.siteId, userId);
    if (!existing) throw notFound("That qualification");
    await repo.deleteQualified(trx, ctx.siteId, userId);
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_qualified_person",
      entityId: userId,
      action: "delete",
      actorId: ctx.actor.id,
      before: existing,
    });
  });
}

// ---------------- the plan ----------------
async function checkScope(
  trx: Trx,
  ctx: Ctx,
  boardId: string,
  b: { sectionIds?: string[]; positionIds?: string[]; dependsOnId?: string | null; qualifiedPersonId?: string | null },
  stageId?: string,
) {
  if (b.sectionIds) {
    const mine = new Set((await repo.listSections(trx, boardId)).map((s) => s.id));
    if (b.sectionIds.some((id) => !mine.has(id))) throw invalid("sectionIds", "A section named is not on this board.");
  }
  if (b.positionIds) {
    const mine = new Set((await repo.listPositions(trx, boardId)).map((p) => p.id));
    if (b.positionIds.some((id) => !mine.has(id)))
      throw invalid("positionIds", "A circuit named is not on this board.");
  }
  if (b.dependsOnId) {
    const dep = await repo.findStage(trx, ctx.siteId, b.dependsOnId);
    if (!dep || dep.boardId !== boardId || dep.id === stageId)
      throw invalid("dependsOnId", "The stage it depends on must be another stage of this board.");
  }
  if (b.qualifiedPersonId && !(await repo.getQualified(trx, ctx.siteId, b.qualifiedPersonId)))
    throw invalid("qualifiedPersonId", "That person is not recorded as a qualified person on the crew page.");
}

export async function createStage(db: Db, ctx: Ctx, boardId: string, body: CreateStageBody) {
  must(ctx, "rts.plan", "Only the curator plans the return to service.");
  return db.transaction().execute(async (trx) => {
    if (!(await repo.findBoard(trx, ctx.siteId, boardId))) throw notFound("That board");
    await checkScope(trx, ctx, boardId, body);
    const { sectionIds, positionIds, ...fields } = body;
    const sortOrder = (await repo.maxStageOrder(trx, boardId)) + 1;
    const stage = await repo.insertStage(trx, { ...fields, siteId: ctx.siteId, boardId, sortOrder });
    if (body.dependsOnId) {
      const dep = (await repo.findStage(trx, ctx.siteId, body.dependsOnId))!;
      if (dep.sortOrder > sortOrder) throw invalid("dependsOnId", "A stage cannot depend on one that comes after it.");
    }
    await repo.replaceItems(trx, ctx.siteId, stage.id, sectionIds, positionIds);
    const { template } = await loadSettings(trx, ctx.siteId);
    await repo.insertSteps(
      trx,
      template.map((t, i) => ({
        siteId: ctx.siteId,
        stageId: stage.id,
        sortOrder: i + 1,
        kind: t.kind,
        title: t.title,
        detail: t.detail,
        qualifiedOnly: QUALIFIED_ONLY_KINDS.has(t.kind),
      })),
    );
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_stage",
      entityId: stage.id,
      action: "create",
      actorId: ctx.actor.id,
      boardId,
      after: body,
    });
    return stage;
  });
}

const SCOPE_FIELDS = [
  "sectionIds",
  "positionIds",
  "supply",
  "protectionDevice",
  "protectionRatingA",
  "protectionLimitA",
  "voltageStep",
  "stepVolts",
] as const;

const SCOPE_WORDS: Record<(typeof SCOPE_FIELDS)[number], string> = {
  sectionIds: "sections",
  positionIds: "positions",
  supply: "supply",
  protectionDevice: "protection",
  protectionRatingA: "protection rating",
  protectionLimitA: "protection limit",
  voltageStep: "voltage",
  stepVolts: "voltage",
};
const sameSet = (a: string[], b: string[]) => a.length === b.length && a.every((x) => b.includes(x));

/**
 * Which of the stage's scope, supply, protection and voltage the edit changes, in words ("protection rating,
 * positions"): hold points signed before the change attested to the stage as it was.
 */
async function scopeChanges(trx: Trx, s: StageRow, body: PatchStageBody) {
  const items = await repo.listItems(trx, [s.id]);
  const had = {
    sectionIds: items.flatMap((i) => (i.sectionId ? [i.sectionId] : [])),
    positionIds: items.flatMap((i) => (i.positionId ? [i.positionId] : [])),
  };
  const changed = SCOPE_FIELDS.filter((f) => {
    const v = body[f];
    if (v === undefined) return false;
    if (f === "sectionIds" || f === "positionIds") return !sameSet(v as string[], had[f]);
    return v !== s[f];
  });
  return [...new Set(changed.map((f) => SCOPE_WORDS[f]))];
}

/**
 * Strikes out every entry in force of the stage's current attempt, with the reason: a change of scope, supply,
 * protection or voltage before the energisation voids what was signed for the stage as it was (common practice: a
 * changed job is checked again). Each strike supersedes its entry, as a person's would; the log keeps both.
 */
async function voidEntries(trx: Trx, ctx: Ctx, s: StageRow, what: string[]) {
  const all = (await repo.listSignoffs(trx, [s.id])).filter((x) => x.attempt === s.attempt);
  const live = all.filter((x) => x.kind !== "struck" && !all.some((y) => y.supersedesId === x.id));
  if (!live.length) return 0;
  const signerName = await repo.userName(trx, ctx.actor.id);
  const reason = `Voided: the stage's ${what.join(", ")} changed after this was signed. Check and sign it again.`;
  for (const x of live)
    await repo.insertSignoff(trx, {
      siteId: ctx.siteId,
      stageId: s.id,
      stepId: x.stepId,
      attempt: s.attempt,
      kind: "struck",
      signedBy: ctx.actor.id,
      signerName,
      signedAt: new Date(),
      reason,
      note: "",
      evidence: "[]",
      supersedesId: x.id,
      covers: null,
    });
  return live.length;
}

export async function patchStage(db: Db, ctx: Ctx, stageId: string, body: PatchStageBody) {
  must(ctx, "rts.plan", "Only the curator plans the return to service.");
  return db.transaction().execute(async (trx) => {
    const s = await stageOrThrow(trx, ctx, stageId, true);
    if (s.version !== body.version)
      throw conflict(
        "Someone changed this stage since you opened it. Here it is now.",
        await stageView(trx, ctx.siteId, s.boardId, stageId),
      );
    if (s.status === "released")
      throw new AppError(409, "stage_released", "A released stage is part of the record and cannot be changed.");
    if (s.status === "energised" && SCOPE_FIELDS.some((f) => body[f] !== undefined))
      throw new AppError(
        409,
        "stage_live",
        "The stage is live: its scope, supply, protection and voltage stay as energised. De-energise and start a new attempt to change them.",
      );
    await checkScope(trx, ctx, s.boardId, body, stageId);
    const changed = s.status === "planned" ? await scopeChanges(trx, s, body) : [];
    const voided = changed.length ? await voidEntries(trx, ctx, s, changed) : 0;
    const { version, sectionIds, positionIds, ...fields } = body;
    if (fields.dependsOnId) {
      const dep = (await repo.findStage(trx, ctx.siteId, fields.dependsOnId))!;
      if (dep.sortOrder > s.sortOrder)
        throw invalid("dependsOnId", "A stage cannot depend on one that comes after it.");
    }
    const saved = await repo.updateStage(trx, stageId, version, fields);
    if (!saved)
      throw conflict(
        "Someone changed this stage at the same moment.",
        await stageView(trx, ctx.siteId, s.boardId, stageId),
      );
    if (sectionIds || positionIds) {
      const items = await repo.listItems(trx, [stageId]);
      await repo.replaceItems(
        trx,
        ctx.siteId,
        stageId,
        sectionIds ?? items.flatMap((i) => (i.sectionId ? [i.sectionId] : [])),
        positionIds ?? items.flatMap((i) => (i.positionId ? [i.positionId] : [])),
      );
    }
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_stage",
      entityId: stageId,
      action: "update",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      before: s,
      after: voided ? { ...body, voidedEntries: voided } : body,
    });
    return saved;
  });
}

export async function deleteStage(db: Db, ctx: Ctx, stageId: string) {
  must(ctx, "rts.plan", "Only the curator plans the return to service.");
  await db.transaction().execute(async (trx) => {
    const s = await stageOrThrow(trx, ctx, stageId, true);
    if (s.status !== "planned" || s.attempt > 1 || (await repo.stageHasSignoffs(trx, stageId)))
      throw new AppError(
        409,
        "stage_has_record",
        "This stage already has signatures or energisations on record; it stays.",
      );
    await repo.deleteStage(trx, stageId);
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_stage",
      entityId: stageId,
      action: "delete",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      before: s,
    });
  });
}

export async function moveStage(db: Db, ctx: Ctx, stageId: string, toIndex: number) {
  must(ctx, "rts.plan", "Only the curator plans the return to service.");
  return db.transaction().execute(async (trx) => {
    const s = await stageOrThrow(trx, ctx, stageId, true);
    const stages = await repo.listStages(trx, s.boardId);
    if (toIndex >= stages.length) throw invalid("toIndex", `There are ${stages.length} stages.`);
    const r = checkReorder(stages, stageId, toIndex);
    if (!r.ok) throw new AppError(409, "depends_on", r.message);
    await repo.setStageOrder(trx, r.order);
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_stage",
      entityId: stageId,
      action: "reorder",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      after: { order: r.order },
    });
    return r.order;
  });
}

async function editableStageOfStep(trx: Trx, ctx: Ctx, stageId: string) {
  const s = await stageOrThrow(trx, ctx, stageId, true);
  if (s.status !== "planned")
    throw new AppError(409, "stage_under_way", "Hold points are changed only while the stage is being prepared.");
  return s;
}

export async function addStep(db: Db, ctx: Ctx, stageId: string, body: z.infer<typeof stepBody>) {
  must(ctx, "rts.plan", "Only the curator edits hold points.");
  return db.transaction().execute(async (trx) => {
    const s = await editableStageOfStep(trx, ctx, stageId);
    const steps = await repo.listSteps(trx, [stageId]);
    await repo.insertSteps(trx, [
      {
        siteId: ctx.siteId,
        stageId,
        sortOrder: steps.length + 1,
        kind: body.kind,
        title: body.title,
        detail: body.detail,
        qualifiedOnly: QUALIFIED_ONLY_KINDS.has(body.kind),
      },
    ]);
    const all = await repo.listSteps(trx, [stageId]);
    const added = all.at(-1)!;
    if (body.atIndex !== undefined && body.atIndex < steps.length) {
      const order = all.map((x) => x.id).filter((id) => id !== added.id);
      order.splice(body.atIndex, 0, added.id);
      await repo.setStepOrder(trx, order);
    }
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_step",
      entityId: added.id,
      action: "create",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      after: body,
    });
    return added;
  });
}

export async function patchStep(db: Db, ctx: Ctx, stepId: string, body: z.infer<typeof patchStepBody>) {
  must(ctx, "rts.plan", "Only the curator edits hold points.");
  return db.transaction().execute(async (trx) => {
    const step = await repo.findStep(trx, ctx.siteId, stepId);
    if (!step) throw notFound("That hold point");
    const s = await editableStageOfStep(trx, ctx, step.stageId);
    const { version, ...fields } = body;
    const saved = await repo.updateStep(trx, stepId, version, fields);
    if (!saved)
      throw conflict(
        "Someone changed this hold point since you opened it.",
        await repo.findStep(trx, ctx.siteId, stepId),
      );
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_step",
      entityId: stepId,
      action: "update",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      before: step,
      after: fields,
    });
    return saved;
  });
}

export async function deleteStep(db: Db, ctx: Ctx, stepId: string) {
  must(ctx, "rts.plan", "Only the curator edits hold points.");
  await db.transaction().execute(async (trx) => {
    const step = await repo.findStep(trx, ctx.siteId, stepId);
    if (!step) throw notFound("That hold point");
    const s = await editableStageOfStep(trx, ctx, step.stageId);
    if (await repo.stepHasSignoffs(trx, stepId))
      throw new AppError(409, "step_signed", "This hold point has been signed; it stays on the record.");
    await repo.deleteStep(trx, stepId);
    await repo.setStepOrder(
      trx,
      (await repo.listSteps(trx, [step.stageId])).map((x) => x.id),
    );
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_step",
      entityId: stepId,
      action: "delete",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      before: step,
    });
  });
}

export async function moveStep(db: Db, ctx: Ctx, stepId: string, toIndex: number) {
  must(ctx, "rts.plan", "Only the curator edits hold points.");
  return db.transaction().execute(async (trx) => {
    const step = await repo.findStep(trx, ctx.siteId, stepId);
    if (!step) throw notFound("That hold point");
    const s = await editableStageOfStep(trx, ctx, step.stageId);
    if (await repo.stageHasSignoffs(trx, step.stageId))
      throw new AppError(409, "stage_signed", "Hold points already signed keep their order.");
    const order = (await repo.listSteps(trx, [step.stageId])).map((x) => x.id).filter((id) => id !== stepId);
    if (toIndex > order.length) throw invalid("toIndex", `There are ${order.length + 1} hold points.`);
    order.splice(toIndex, 0, stepId);
    await repo.setStepOrder(trx, order);
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_step",
      entityId: stepId,
      action: "reorder",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      after: { order },
    });
    return order;
  });
}

// ---------------- sign-offs ----------------
async function checkEvidence(trx: Trx, siteId: string, items: EvidenceItem[]) {
  for (const e of items)
    if (!(await repo.evidenceOnSite(trx, siteId, e.type, e.id)))
      throw invalid("evidence", `The linked ${e.type.replace("_", " ")} is not on this site.`);
}

async function assertQualified(trx: Trx, ctx: Ctx, now: Date) {
  const q = await repo.getQualified(trx, ctx.siteId, ctx.actor.id);
  if (!isQualifiedOn(q ? { expiresOn: q.expiresOn } : null, await siteToday(trx, ctx.siteId, now)))
    throw forbidden(
      "Only a qualified person for energisation, with a current qualification on the crew page, signs this hold point.",
    );
}

/** A signature needs the hold point ready as if nothing were signed: no blocker, every hold point before it met. */
function refuseUnlessReady(hp: HoldPoint, view: unknown) {
  const { state, blockers } = hp.unsigned;
  if (state === "ready") return;
  const why =
    state === "blocked"
      ? blockers.map((b) => b.message).join(" ")
      : "An earlier hold point is not met yet, or the stage is not energised.";
  throw new AppError(
    409,
    state === "blocked" ? "blocked" : "waiting",
    `This hold point cannot be signed yet. ${why}`,
    undefined,
    view,
  );
}

export async function sign(db: Db, ctx: Ctx, stepId: string, body: z.infer<typeof signBody>, now = new Date()) {
  if (body.kind === "released") must(ctx, "rts.release_blocked", "Only the curator releases a blocked hold point.");
  else must(ctx, "rts.sign", "Your role on this site does not sign hold points.");
  try {
    return await db.transaction().execute(async (trx) => {
      const step = await repo.findStep(trx, ctx.siteId, stepId);
      if (!step) throw notFound("That hold point");
      const s = await stageOrThrow(trx, ctx, step.stageId, true);
      const current = () => stageView(trx, ctx.siteId, s.boardId, s.id, now);
      if (body.attempt !== s.attempt)
        throw conflict("The stage was started again since you opened it. Here it is now.", await current());
      const view = (await current())!;
      const hp = view.gate.holdPoints.find((h) => h.stepId === stepId)!;
      if (hp.signoff && hp.signoff.kind !== "struck")
        throw conflict(
          `${hp.signoff.signerName} already signed this hold point at ${hp.signoff.signedAt}. Here is the stage now.`,
          view,
        );
      if (step.qualifiedOnly && body.kind === "signed") await assertQualified(trx, ctx, now);
      if (body.kind === "released") {
        if (step.qualifiedOnly)
          throw new AppError(
            409,
            "not_releasable",
            "A qualified person's hold point cannot be released by the curator; it must be met and signed.",
          );
        if (hp.state !== "blocked")
          throw new AppError(
            409,
            "not_blocked",
            "Only a blocked hold point can be released with a reason.",
            undefined,
            view,
          );
        if (body.reason.trim().length < 10)
          throw invalid("reason", "Write the reason for releasing a blocked hold point (at least a sentence).");
      } else refuseUnlessReady(hp, view);
      await checkEvidence(trx, ctx.siteId, body.evidence);
      const signerName = await repo.userName(trx, ctx.actor.id);
      const entry = await repo.insertSignoff(trx, {
        siteId: ctx.siteId,
        stageId: s.id,
        stepId,
        attempt: s.attempt,
        kind: body.kind,
        signedBy: ctx.actor.id,
        signerName,
        signedAt: now,
        reason: body.reason,
        note: body.note,
        evidence: JSON.stringify(body.evidence),
        covers: body.kind === "released" ? hp.blockers.map(blockerKey) : null,
        // After a strike (a person's, or a change of the stage's scope), the new entry continues the chain.
        supersedesId: hp.signoff?.kind === "struck" ? hp.signoff.id : null,
      });
      if (body.kind === "signed" && step.kind === "energise") {
        const at = body.at ? new Date(body.at) : now;
        if (at.getTime() > now.getTime() + 3_600_000) throw invalid("at", "The energisation's time is in the future.");
        await repo.insertEnergisation(trx, {
          siteId: ctx.siteId,
          boardId: s.boardId,
          stageId: s.id,
          attempt: s.attempt,
          kind: "energise",
          at,
          supply: s.supply,
          volts: s.stepVolts,
          protectionDevice: s.protectionDevice,
          protectionRatingA: s.protectionRatingA,
          note: body.note,
          recordedBy: ctx.actor.id,
        });
        await repo.updateStage(trx, s.id, s.version, { status: "energised", energisedAt: at });
      }
      if (body.kind === "signed" && step.kind === "release")
        await repo.updateStage(trx, s.id, s.version, { status: "released", releasedAt: now });
      await recordAudit(trx, {
        siteId: ctx.siteId,
        entityType: "rts_signoff",
        entityId: entry.id,
        action: body.kind === "released" ? "release_blocked" : "sign",
        actorId: ctx.actor.id,
        boardId: s.boardId,
        after: { stepId, kind: body.kind, reason: body.reason },
      });
      return (await current())!;
    });
  } catch (e) {
    if (!isPgUnique(e)) throw e;
    const step = (await repo.findStep(db, ctx.siteId, stepId))!;
    const s = (await repo.findStage(db, ctx.siteId, step.stageId))!;
    throw conflict(
      "Someone else signed this hold point at the same moment. Here is the stage now.",
      await stageView(db, ctx.siteId, s.boardId, s.id, now),
    );
  }
}

export async function supersede(
  db: Db,
  ctx: Ctx,
  signoffId: string,
  body: z.infer<typeof supersedeBody>,
  now = new Date(),
) {
  if (body.kind === "released") must(ctx, "rts.release_blocked", "Only the curator releases a blocked hold point.");
  else must(ctx, "rts.sign", "Your role on this site does not sign hold points.");
  try {
    return await db.transaction().execute(async (trx) => {
      const old = await repo.findSignoff(trx, ctx.siteId, signoffId);
      if (!old) throw notFound("That signature");
      const s = await stageOrThrow(trx, ctx, old.stageId, true);
      const step = (await repo.findStep(trx, ctx.siteId, old.stepId))!;
      const current = () => stageView(trx, ctx.siteId, s.boardId, s.id, now);
      if (old.attempt !== s.attempt)
        throw conflict("That signature belongs to an earlier attempt; it stays as it is.", await current());
      const all = await repo.listSignoffs(trx, [s.id]);
      if (all.some((x) => x.supersedesId === old.id))
        throw conflict("That entry has already been corrected. Here is the stage now.", await current());
      if (
        step.qualifiedOnly &&
        (s.status === "energised" || s.status === "released" || s.status === "stopped") &&
        body.kind !== "signed"
      )
        throw new AppError(
          409,
          "in_effect",
          "The energisation or release has happened; correct its entry with a new signature, or de-energise the stage.",
        );
      if (body.kind === "signed" && step.qualifiedOnly) await assertQualified(trx, ctx, now);
      if (body.kind === "struck" && s.status !== "planned" && !AFTER_ENERGISE_KINDS.has(step.kind))
        throw new AppError(
          409,
          "in_effect",
          "The stage was energised on this entry: correct it with a new entry, or de-energise and start a new attempt.",
        );
      if (body.kind === "struck" && old.signedBy !== ctx.actor.id && !can(ctx.actor.role, "rts.plan"))
        throw forbidden("Only the person who signed, or the curator, strikes out an entry.");
      if (body.kind === "released" && step.qualifiedOnly)
        throw new AppError(409, "not_releasable", "A qualified person's hold point cannot be released by the curator.");
      // A new signature or release in place of an entry passes the gate as a first one would: judged as if no entry
      // were in force. (A qualified person's entry of an energisation or release that has happened is corrected
      // with a new signature as it stands: that records what happened, it does not let anything happen.)
      const view = (await current())!;
      const hp = view.gate.holdPoints.find((h) => h.stepId === old.stepId)!;
      const inEffect =
        step.qualifiedOnly && (s.status === "energised" || s.status === "released" || s.status === "stopped");
      if (body.kind === "signed" && !inEffect) refuseUnlessReady(hp, view);
      if (body.kind === "released") {
        if (hp.unsigned.state !== "blocked")
          throw new AppError(
            409,
            "not_blocked",
            "Only a blocked hold point can be released with a reason: nothing blocks this one now.",
            undefined,
            view,
          );
        if (body.reason.trim().length < 10)
          throw invalid("reason", "Write the reason for releasing a blocked hold point (at least a sentence).");
      }
      await checkEvidence(trx, ctx.siteId, body.evidence);
      const entry = await repo.insertSignoff(trx, {
        siteId: ctx.siteId,
        stageId: s.id,
        stepId: old.stepId,
        attempt: s.attempt,
        kind: body.kind,
        signedBy: ctx.actor.id,
        signerName: await repo.userName(trx, ctx.actor.id),
        signedAt: now,
        reason: body.reason,
        note: body.note,
        evidence: JSON.stringify(body.evidence),
        supersedesId: old.id,
        covers: body.kind === "released" ? hp.unsigned.blockers.map(blockerKey) : null,
      });
      await recordAudit(trx, {
        siteId: ctx.siteId,
        entityType: "rts_signoff",
        entityId: entry.id,
        action: "supersede",
        actorId: ctx.actor.id,
        boardId: s.boardId,
        before: { id: old.id, kind: old.kind },
        after: { kind: body.kind, reason: body.reason },
      });
      return (await current())!;
    });
  } catch (e) {
    if (!isPgUnique(e)) throw e;
    const old = (await repo.findSignoff(db, ctx.siteId, signoffId))!;
    const s = (await repo.findStage(db, ctx.siteId, old.stageId))!;
    throw conflict(
      "Someone corrected that entry at the same moment. Here is the stage now.",
      await stageView(db, ctx.siteId, s.boardId, s.id, now),
    );
  }
}

// ---------------- the log: watch checks, incidents, de-energising, restarting ----------------
const INCIDENT_CATEGORY: Record<IncidentKind, "insulation" | "heat" | "wiring" | "other"> = {
  protection_operated: "wiring",
  dark_lamp: "insulation",
  hot_spot: "heat",
  low_insulation: "insulation",
  other: "other",
};

/**
 * Records an incident on a stage and opens its safety-critical, energisation-blocking defect
 * through the defects service in the same transaction; a live stage stops. A protection that
 * operated has de-energised the stage by itself: that is logged too.
 */
export async function openIncident(
  trx: Trx,
  ctx: Ctx,
  s: NonNullable<Awaited<ReturnType<typeof repo.lockStage>>>,
  i: {
    kind: IncidentKind;
    positionId: string | null;
    summary: string;
    note: string;
    at: Date;
    watchCheckId?: string | null;
    readingKind?: "thermal_scan" | "insulation_reading";
    readingId?: string;
  },
) {
  const defect = await raiseIncidentDefect(trx, ctx, {
    boardId: s.boardId,
    positionId: i.positionId,
    category: INCIDENT_CATEGORY[i.kind],
    title: `Return to service incident: ${i.summary}`,
    description: `Recorded during “${s.name}” (attempt ${s.attempt}) at ${i.at.toISOString()}.${i.note ? `\n\n${i.note}` : ""}\n\nOpened automatically by the return-to-service log; the stage is stopped until it is dealt with.`,
    ...(i.readingKind && i.readingId
      ? {
          raisedFrom: {
            readingKind: i.readingKind === "thermal_scan" ? ("thermal" as const) : ("insulation" as const),
            readingId: i.readingId,
          },
        }
      : {}),
  });
  const incident = await repo.insertIncident(trx, {
    siteId: ctx.siteId,
    boardId: s.boardId,
    stageId: s.id,
    attempt: s.attempt,
    at: i.at,
    kind: i.kind,
    positionId: i.positionId,
    defectId: defect.id,
    watchCheckId: i.watchCheckId ?? null,
    readingKind: i.readingKind ?? null,
    readingId: i.readingId ?? null,
    summary: i.summary,
    note: i.note,
    recordedBy: ctx.actor.id,
  });
  if (i.kind === "protection_operated" && s.status === "energised")
    await repo.insertEnergisation(trx, {
      siteId: ctx.siteId,
      boardId: s.boardId,
      stageId: s.id,
      attempt: s.attempt,
      kind: "de_energise",
      at: i.at,
      supply: s.supply,
      volts: null,
      protectionDevice: s.protectionDevice,
      protectionRatingA: s.protectionRatingA,
      note: "Protection operated",
      recordedBy: ctx.actor.id,
    });
  if (s.status === "energised") {
    const fresh = (await repo.findStage(trx, ctx.siteId, s.id))!;
    await repo.updateStage(trx, s.id, fresh.version, { status: "stopped" });
  }
  await recordAudit(trx, {
    siteId: ctx.siteId,
    entityType: "rts_incident",
    entityId: incident.id,
    action: "create",
    actorId: ctx.actor.id,
    boardId: s.boardId,
    positionId: i.positionId,
    after: { kind: i.kind, summary: i.summary, defectId: defect.id },
  });
  return { incident, defect };
}

const checkAt = (at: string | undefined, now: Date) => {
  const t = at ? new Date(at) : now;
  if (t.getTime() > now.getTime() + 3_600_000) throw invalid("at", "That time is in the future.");
  return t;
};

export async function recordWatchCheck(
  db: Db,
  ctx: Ctx,
  stageId: string,
  body: z.infer<typeof watchCheckBody>,
  now = new Date(),
  /** What the phone's clock read as it sent (`Tideline-Device-Time`); null when it did not say. */
  deviceNow: Date | null = null,
) {
  must(ctx, "rts.record_watch", "Your role on this site does not record watch checks.");
  return db.transaction().execute(async (trx) => {
    const s = await stageOrThrow(trx, ctx, stageId, true);
    if (s.status !== "energised")
      throw new AppError(409, "not_live", "Watch checks are recorded while the stage is live under watch.");
    // The phone's clock is not trusted: the time it gave is kept, and put on the server's clock.
    const deviceAt = body.at ? new Date(body.at) : null;
    const clock = judgeDeviceTime({ deviceAt, deviceNow, serverNow: now, notBefore: s.energisedAt });
    if (!clock.ok) throw invalid("at", clock.message);
    const at = clock.at;
    const { level } =
      body.thermalC != null && body.ambientC != null
        ? classifyTemperatureRise({ overAmbientC: body.thermalC - body.ambientC })
        : { level: 0 };
    // A check that opens an incident raises a defect: what a raise takes first (the site's demand lock) comes
    // before the check's own row, which names the thermal position (DEVELOPERS.md, "Lock order of the wanted
    // list's writers"), and before that position is looked up (a deletion holding the lock has then finished).
    if (body.lamps === "one_dark" || level >= 3) await holdForRaise(trx, ctx.siteId);
    if (body.thermalPositionId) {
      const p = (await repo.listPositions(trx, s.boardId)).find((x) => x.id === body.thermalPositionId);
      if (!p) throw invalid("thermalPositionId", "That position is not on this board.");
    }
    const check = await repo.insertWatchCheck(trx, {
      ...body,
      siteId: ctx.siteId,
      stageId,
      attempt: s.attempt,
      at,
      deviceAt,
      clockSkewS: clock.skewS,
      recordedBy: ctx.actor.id,
    });
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_watch_check",
      entityId: check.id,
      action: "create",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      after: { ...body, at: at.toISOString(), deviceAt: body.at ?? null, clockSkewS: clock.skewS },
    });
    const incidents = [];
    if (body.lamps === "one_dark")
      incidents.push(
        await openIncident(trx, ctx, s, {
          kind: "dark_lamp",
          positionId: null,
          at,
          watchCheckId: check.id,
          note: body.note,
          summary: `Ground lamp dark on phase ${body.lampPhase} during the watch of “${s.name}”`,
        }),
      );
    if (level >= 3) {
      const fresh = (await repo.findStage(trx, ctx.siteId, stageId))!;
      incidents.push(
        await openIncident(trx, ctx, fresh, {
          kind: "hot_spot",
          positionId: body.thermalPositionId,
          at,
          watchCheckId: check.id,
          note: body.note,
          summary: `Thermal level ${level}: ${body.thermalC} °C with air at ${body.ambientC} °C during the watch of “${s.name}”`,
        }),
      );
    }
    return {
      check,
      incidents: incidents.map((x) => ({ id: x.incident.id, defectId: x.defect.id, defectRef: x.defect.ref })),
    };
  });
}

export async function recordIncident(
  db: Db,
  ctx: Ctx,
  stageId: string,
  body: z.infer<typeof incidentBody>,
  now = new Date(),
) {
  must(ctx, "rts.record_incident", "Your role on this site does not record incidents.");
  return db.transaction().execute(async (trx) => {
    const s = await stageOrThrow(trx, ctx, stageId, true);
    if (s.status !== "energised" && s.status !== "stopped")
      throw new AppError(409, "not_live", "Incidents are recorded on a stage that has been energised.");
    if (body.positionId && !(await repo.listPositions(trx, s.boardId)).some((p) => p.id === body.positionId))
      throw invalid("positionId", "That position is not on this board.");
    const summary = `${{ protection_operated: "Protection operated", dark_lamp: "Ground lamp dark", hot_spot: "Hot spot", low_insulation: "Insulation below the minimum", other: "Incident" }[body.kind]} on “${s.name}”`;
    const r = await openIncident(trx, ctx, s, {
      kind: body.kind,
      positionId: body.positionId,
      note: body.note,
      at: checkAt(body.at, now),
      summary,
    });
    return { id: r.incident.id, defectId: r.defect.id, defectRef: r.defect.ref };
  });
}

/** Is the stage's latest energisation event of this attempt an energise (the stage is live)? */
async function isLive(trx: Trx, boardId: string, stageId: string, attempt: number) {
  const last = (await repo.listEnergisations(trx, boardId))
    .filter((e) => e.stageId === stageId && e.attempt === attempt)
    .at(-1);
  return last?.kind === "energise";
}

export async function deEnergise(
  db: Db,
  ctx: Ctx,
  stageId: string,
  body: z.infer<typeof deEnergiseBody>,
  now = new Date(),
) {
  must(ctx, "rts.de_energise", "Your role on this site does not record de-energising.");
  return db.transaction().execute(async (trx) => {
    const s = await stageOrThrow(trx, ctx, stageId, true);
    if (!(await isLive(trx, s.boardId, s.id, s.attempt))) throw new AppError(409, "not_live", "The stage is not live.");
    const ev = await repo.insertEnergisation(trx, {
      siteId: ctx.siteId,
      boardId: s.boardId,
      stageId,
      attempt: s.attempt,
      kind: "de_energise",
      at: checkAt(body.at, now),
      supply: s.supply,
      volts: null,
      protectionDevice: s.protectionDevice,
      protectionRatingA: s.protectionRatingA,
      note: body.note,
      recordedBy: ctx.actor.id,
    });
    if (s.status === "energised") await repo.updateStage(trx, s.id, s.version, { status: "de_energised" });
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_energisation",
      entityId: ev.id,
      action: "de_energise",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      after: body,
    });
    return ev;
  });
}

/** A new attempt: every hold point is signed again (the old attempt stays on record). */
export async function restart(db: Db, ctx: Ctx, stageId: string, body: z.infer<typeof restartBody>) {
  must(ctx, "rts.restart", "Only the curator starts a stage again.");
  return db.transaction().execute(async (trx) => {
    const s = await stageOrThrow(trx, ctx, stageId, true);
    if (s.version !== body.version)
      throw conflict(
        "Someone changed this stage since you opened it.",
        await stageView(trx, ctx.siteId, s.boardId, s.id),
      );
    if (s.status !== "stopped" && s.status !== "de_energised")
      throw new AppError(409, "not_restartable", "Only a stopped or de-energised stage is started again.");
    if (await isLive(trx, s.boardId, s.id, s.attempt))
      throw new AppError(409, "still_live", "Record the de-energisation first: the stage is still live.");
    const saved = await repo.updateStage(trx, s.id, s.version, {
      status: "planned",
      attempt: s.attempt + 1,
      energisedAt: null,
      releasedAt: null,
    });
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_stage",
      entityId: s.id,
      action: "restart",
      actorId: ctx.actor.id,
      boardId: s.boardId,
      before: { attempt: s.attempt, status: s.status },
      after: { attempt: s.attempt + 1, reason: body.reason },
    });
    return saved;
  });
}

// ---------------- breaker operations ----------------
export async function recordOperation(
  db: Db,
  ctx: Ctx,
  componentId: string,
  body: z.infer<typeof operationBody>,
  now = new Date(),
) {
  must(ctx, "rts.record_operation", "Your role on this site does not record breaker operations.");
  return db.transaction().execute(async (trx) => {
    const c = await repo.findComponent(trx, ctx.siteId, componentId);
    if (!c) throw notFound("That component");
    if (body.stageId) {
      const s = await repo.findStage(trx, ctx.siteId, body.stageId);
      if (!s || s.boardId !== c.boardId) throw invalid("stageId", "That stage is not on this component's board.");
    }
    const op = await repo.insertOperation(trx, {
      siteId: ctx.siteId,
      boardId: c.boardId,
      componentId,
      stageId: body.stageId,
      operation: body.operation,
      at: checkAt(body.at, now),
      why: body.why,
      operatedBy: ctx.actor.id,
    });
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_breaker_operation",
      entityId: op.id,
      action: "create",
      actorId: ctx.actor.id,
      boardId: c.boardId,
      positionId: c.positionId,
      after: body,
    });
    const used = (await repo.listOperations(trx, c.boardId)).filter((o) => o.componentId === componentId).length;
    const set = await repo.getBudget(trx, componentId);
    const budget = set?.budget ?? defaultOperationsBudget(c.kind, c.year == null ? null : Number(c.year))?.budget ?? 0;
    return { id: op.id, status: operationsStatus(used, budget) };
  });
}

export async function setBudget(db: Db, ctx: Ctx, componentId: string, body: z.infer<typeof budgetBody>) {
  must(ctx, "rts.set_budget", "Only the curator sets operations budgets.");
  return db.transaction().execute(async (trx) => {
    const c = await repo.findComponent(trx, ctx.siteId, componentId);
    if (!c) throw notFound("That component");
    const existing = await repo.getBudget(trx, componentId);
    const values = { budget: body.budget, reason: body.reason, updatedBy: ctx.actor.id };
    const saved = !existing
      ? body.version === 0
        ? await repo.insertBudget(trx, { siteId: ctx.siteId, componentId, ...values })
        : undefined
      : body.version === existing.version
        ? await repo.updateBudget(trx, componentId, existing.version, values)
        : undefined;
    if (!saved)
      throw conflict(
        "Someone changed this budget since you opened it. Here it is now.",
        (await repo.getBudget(trx, componentId)) ?? null,
      );
    await recordAudit(trx, {
      siteId: ctx.siteId,
      entityType: "rts_operation_budget",
      entityId: componentId,
      action: existing ? "update" : "create",
      actorId: ctx.actor.id,
      boardId: c.boardId,
      positionId: c.positionId,
      before: existing ?? null,
      after: values,
    });
    return saved;
  });
}
