/** Use cases on a component: nameplate edits, inspections, custody moves and dispositions. */
import { astmD610Grade, iso4628RiGrade } from "../../src/domain/corrosion";
import { can } from "../../src/domain/permissions";
import { judgeDeviceTime, LATE_ARRIVAL_S } from "../../src/domain/device-clock";
import type { z } from "zod";
import type {
  PatchComponentBody,
  createInspectionBody,
  custodyBody,
  dispositionBody,
} from "../../src/schemas/inventory";
import { diff, recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError } from "../errors";
import { UNIQUE, defined, mapUnique, requireOwned, stale, updateVersioned } from "./common";
import { findOwned } from "./owned-repository";
import { recommendFor } from "./recommendation";
import * as repo from "./survey-repository";
import * as positions from "./positions-repository";
import * as boards from "./boards-repository";
import * as readings from "../readings/reads";
import type { Verdict } from "../../src/domain/reading-judgement";
import {
  CUSTODY,
  type ComponentKind,
  type Custody as CustodyState,
  type Disposition,
  type Role,
} from "../../src/domain/vocab";
import {
  READING_REQUIRED_KINDS,
  checkCustodyMove,
  proposeNext,
  type CustodyFacts,
} from "../../src/domain/custody-chain";
import { demandChanged } from "../parts/service";
import { componentHeritageChanged, lockDefectsFor } from "../defects/service";
import { refreshBoardSummaries } from "./board-summaries-repository";

type Inspect = z.output<typeof createInspectionBody>;
type Custody = z.output<typeof custodyBody>;
type Decide = z.output<typeof dispositionBody>;

/** The component fields the site overview counts (server/inventory/board-summaries-repository.ts). */
const COUNTED = ["heritage", "custody", "disposition"] as const;
const countedChange = (before: Record<string, unknown>, patch: Record<string, unknown>) =>
  COUNTED.some((k) => k in patch && patch[k] !== before[k]);

const boardOf = (db: Db, positionId: string) => positions.boardIdOf(db, positionId);

export async function patchComponent(db: Db, siteId: string, id: string, actorId: string, body: PatchComponentBody) {
  const { version, tagNumber, ...rest } = body;
  const patch = {
    ...defined(rest),
    ...(tagNumber === undefined ? {} : { tagNumber: tagNumber === "" ? null : tagNumber }),
  };
  return db.transaction().execute(async (trx) => {
    const before = await requireOwned(trx, "components", siteId, id, "That component", true);
    if (before.version !== version) throw stale("component", before);
    const heritageChanges = patch.heritage !== undefined && patch.heritage !== before.heritage;
    // Its defects are re-ranked after the wanted list's sync: taken now, before the demand lock (the lock order).
    if (heritageChanges) await lockDefectsFor(trx, siteId, { componentIds: [id] });
    const after = await mapUnique(
      () => updateVersioned(trx, "components", siteId, id, version, patch, "component"),
      UNIQUE.tag,
    );
    const d = diff(before as never, patch as never);
    if (d.changed)
      await recordAudit(trx, {
        siteId,
        entityType: "component",
        entityId: id,
        boardId: await boardOf(trx, before.positionId),
        positionId: before.positionId,
        action: "update",
        actorId,
        before: d.before,
        after: d.after,
      });
    if (d.changed) await demandChanged(trx, siteId, { componentIds: [id] }, actorId); // a nameplate change moves its wanted-list demand
    if (heritageChanges) await componentHeritageChanged(trx, siteId, [id]); // original fabric weighs in its defects' priority
    if (countedChange(before as never, patch))
      await refreshBoardSummaries(trx, [await boardOf(trx, before.positionId)]);
    return after;
  });
}

/** Appends an inspection; the ASTM D610 and ISO 4628-3 grades come from src/domain/corrosion.ts. */
/**
 * When a record was made on the phone, on the server's clock: the phone's time of it (`at`) corrected by how far the
 * phone's clock was off as it sent (`Tideline-Device-Time`), judged by src/domain/device-clock.ts. Null when the
 * request gave no time (the server's own then stands). A phone a day or more off, or a time in the future, is refused.
 */
function madeAt(at: string | undefined, deviceNow: Date | null, now: Date): Date | null {
  if (!at) return null;
  const clock = judgeDeviceTime({ deviceAt: new Date(at), deviceNow, serverNow: now });
  if (clock.ok) return clock.at;
  const message =
    clock.code === "clock_off"
      ? "The phone's clock is a day or more off the server's: set the phone's date and time, then send it again."
      : clock.message;
  throw new AppError(400, "invalid_input", message, { at: message });
}

export async function createInspection(
  db: Db,
  siteId: string,
  componentId: string,
  actorId: string,
  b: Inspect,
  deviceNow: Date | null = null,
  now = new Date(),
) {
  const inspectedAt = madeAt(b.at, deviceNow, now);
  return db.transaction().execute(async (trx) => {
    const c = await requireOwned(trx, "components", siteId, componentId, "That component");
    const pct = b.percentRusted ?? null;
    const row = await repo.insertInspection(trx, {
      siteId,
      componentId,
      positionId: c.positionId,
      inspectorId: actorId,
      ...(inspectedAt ? { inspectedAt } : {}),
      percentRusted: pct,
      astmGrade: pct === null ? null : astmD610Grade(pct),
      isoRi: pct === null ? null : iso4628RiGrade(pct),
      belowWaterLine: b.belowWaterLine ?? null,
      contaminants: [...new Set(b.contaminants)],
      mechanism: b.mechanism ?? null,
      insulation: b.insulation ?? null,
      notes: b.notes,
    });
    const boardId = await boardOf(trx, c.positionId);
    await recordAudit(trx, {
      siteId,
      entityType: "inspection",
      entityId: row.id,
      boardId,
      positionId: c.positionId,
      action: "inspect",
      actorId,
      after: row,
    });
    await refreshBoardSummaries(trx, [boardId]);
    return row;
  });
}

const DEFAULT_LOCATION: Record<string, string> = { in_place: "In its position", refitted: "In its position" };

/** What src/domain/custody-chain.ts needs to judge a move of this component. */
async function custodyFacts(
  trx: Db,
  siteId: string,
  c: {
    id: string;
    kind: ComponentKind;
    custody: CustodyState;
    disposition: Disposition | null;
    tagNumber: string | null;
  },
  tagNumber?: string,
): Promise<CustodyFacts> {
  const [inspection, reading] = await Promise.all([
    repo.latestInspection(trx, c.id),
    READING_REQUIRED_KINDS.has(c.kind)
      ? readings.listInsulation(trx, siteId, { componentId: c.id, latestPer: 1 })
      : Promise.resolve([]),
  ]);
  return {
    from: c.custody,
    kind: c.kind,
    disposition: c.disposition,
    tagNumber: tagNumber ?? c.tagNumber,
    latestInsulation: inspection?.insulation ?? null,
    latestMechanism: inspection?.mechanism ?? null,
    latestReading: worstOf(reading.map((r) => r.judgement.verdict)),
  };
}

/**
 * A custody move, checked against the chain (src/domain/custody-chain.ts): a move off the
 * chain is refused with 409, a missing proof with 422, each naming every rule it breaks.
 * The curator (or an admin) may release the releasable ones with `releaseReason`; the move
 * then records which rules were released and why, and the audit trail carries both.
 */
export async function moveCustody(
  db: Db,
  siteId: string,
  componentId: string,
  actor: { id: string; role: Role | "admin" },
  b: Custody,
  deviceNow: Date | null = null,
  now = new Date(),
) {
  const actorId = actor.id;
  // Applied now, in the order the server takes moves (the chain is judged from where the part is now); a move made on
  // a phone with no signal keeps when it was made beside it, when that was a while before (LATE_ARRIVAL_S).
  const made = madeAt(b.at, deviceNow, now);
  const madeAtKept = made && now.getTime() - made.getTime() > LATE_ARRIVAL_S * 1000 ? made : null;
  return db.transaction().execute(async (trx) => {
    const before = await requireOwned(trx, "components", siteId, componentId, "That component", true);
    if (before.version !== b.version) throw stale("component", before);
    const refusals = checkCustodyMove(await custodyFacts(trx, siteId, before, b.tagNumber), b.toState);
    const releasing = b.releaseReason !== undefined;
    if (releasing && !can(actor.role, "custody.release"))
      throw new AppError(403, "forbidden", "Only the curator releases a move the custody chain refuses.", {
        releaseReason: "Curator only",
      });
    const blocking = refusals.filter((r) => !releasing || !r.releasable);
    if (blocking.length) {
      const status = blocking.some((r) => r.status === 409) ? 409 : 422;
      const fields = blocking.some((r) => r.rule === "tag_required")
        ? { tagNumber: "A tag is needed to take it off" }
        : undefined;
      throw new AppError(status, blocking[0].rule, blocking.map((r) => r.message).join(" "), fields, {
        refusals: blocking,
        component: before,
      });
    }
    const released = releasing ? refusals.map((r) => r.rule) : [];
    const releaseReason = released.length ? b.releaseReason! : "";
    const patch: Record<string, unknown> = {
      custody: b.toState,
      custodyLocation: b.location || DEFAULT_LOCATION[b.toState] || "",
    };
    if (b.tagNumber && b.tagNumber !== before.tagNumber) patch.tagNumber = b.tagNumber;
    const component = await mapUnique(
      () => updateVersioned(trx, "components", siteId, componentId, b.version, patch, "component"),
      UNIQUE.tag,
    );
    const move = await repo.insertMove(trx, {
      siteId,
      componentId,
      fromState: before.custody,
      toState: b.toState,
      location: patch.custodyLocation as string,
      note: b.note,
      movedBy: actorId,
      releasedRules: released,
      releaseReason,
      madeAt: madeAtKept,
    });
    await recordAudit(trx, {
      siteId,
      entityType: "component",
      entityId: componentId,
      boardId: await boardOf(trx, before.positionId),
      positionId: before.positionId,
      action: "custody",
      actorId,
      before: {
        custody: before.custody,
        custodyLocation: before.custodyLocation,
        ...(patch.tagNumber ? { tagNumber: before.tagNumber } : {}),
      },
      after: { ...patch, note: b.note, ...(released.length ? { releasedRules: released, releaseReason } : {}) },
    });
    await refreshBoardSummaries(trx, [await boardOf(trx, before.positionId)]);
    return { component, move };
  });
}

/**
 * A custody move another domain's use case causes, inside ITS transaction: the parts workflow
 * moves a component to "ready to refit" when its replacement part is received and to "refitted"
 * when it is fitted (optionally with the fitted part's heritage). The same write as a person's
 * move (the component, a custody_moves row, the audit entry), judged by the same chain: any
 * releasable rule the move breaks is recorded as released with `because` as the reason; a rule
 * that cannot be released refuses the move like any other. Same state and same heritage: nothing.
 */
export async function moveCustodyFor(
  trx: Db,
  siteId: string,
  componentId: string,
  actorId: string,
  m: { toState: CustodyState; note: string; because: string; heritage?: "period" | "modern" },
) {
  const before = await findOwned(trx, "components", siteId, componentId, true);
  if (!before) return null;
  const heritageChanges = m.heritage !== undefined && m.heritage !== before.heritage;
  const moving = before.custody !== m.toState;
  if (!moving && !heritageChanges) return null;
  const refusals = moving ? checkCustodyMove(await custodyFacts(trx, siteId, before), m.toState) : [];
  const fixed = refusals.filter((r) => !r.releasable);
  if (fixed.length) throw new AppError(fixed[0].status, fixed[0].rule, fixed.map((r) => r.message).join(" "));
  const released = refusals.map((r) => r.rule);
  const releaseReason = released.length ? m.because : "";
  const patch: Record<string, unknown> = {
    ...(moving ? { custody: m.toState, custodyLocation: DEFAULT_LOCATION[m.toState] ?? before.custodyLocation } : {}),
    ...(heritageChanges ? { heritage: m.heritage } : {}),
  };
  const component = await updateVersioned(trx, "components", siteId, componentId, before.version, patch, "component");
  if (heritageChanges) await componentHeritageChanged(trx, siteId, [componentId]);
  if (moving)
    await repo.insertMove(trx, {
      siteId,
      componentId,
      fromState: before.custody,
      toState: m.toState,
      location: component.custodyLocation,
      note: m.note,
      movedBy: actorId,
      releasedRules: released,
      releaseReason,
    });
  await recordAudit(trx, {
    siteId,
    entityType: "component",
    entityId: componentId,
    boardId: await boardOf(trx, before.positionId),
    positionId: before.positionId,
    action: moving ? "custody" : "update",
    actorId,
    before: {
      ...(moving ? { custody: before.custody, custodyLocation: before.custodyLocation } : {}),
      ...(heritageChanges ? { heritage: before.heritage } : {}),
    },
    after: { ...patch, note: m.note, ...(released.length ? { releasedRules: released, releaseReason } : {}) },
  });
  await refreshBoardSummaries(trx, [await boardOf(trx, before.positionId)]);
  return component;
}

/**
 * Locks components another domain's use case will move through `moveCustodyFor` later in its
 * transaction, in id order and before that use case takes its own locks (the wanted list's lock order,
 * see server/parts/workflow.ts).
 */
export const lockComponentsFor = (trx: Db, siteId: string, ids: readonly string[]) =>
  repo.lockComponents(trx, siteId, [...new Set(ids)]);

/** What the custody form shows before a move: the rules each state would break and the proposed next move. */
export async function custodyOptions(db: Db, siteId: string, componentId: string) {
  const c = await requireOwned(db, "components", siteId, componentId, "That component");
  const facts = await custodyFacts(db, siteId, c);
  return {
    proposed: proposeNext(facts),
    moves: CUSTODY.filter((s) => s !== c.custody).map((to) => ({ to, refusals: checkCustodyMove(facts, to) })),
  };
}

/** The next free generated tag on the site, T-0001 upwards (typed or scanned tags are kept as they are). */
export async function nextTag(db: Db, siteId: string) {
  const n = Number((await repo.highestGeneratedTag(db, siteId))?.n ?? 0) + 1;
  return { tagNumber: `T-${String(n).padStart(4, "0")}` };
}

/**
 * Stores the decision with the recommendation it was made against. Overridden means a
 * recommendation existed and the decision differs; an override needs a reason.
 */
export async function decideDisposition(db: Db, siteId: string, componentId: string, actorId: string, b: Decide) {
  return db.transaction().execute(async (trx) => {
    const before = await requireOwned(trx, "components", siteId, componentId, "That component", true);
    if (before.version !== b.version) throw stale("component", before);
    const recommendation = await recommendFor(trx, siteId, before);
    const recommended = recommendation.recommendation?.disposition ?? null;
    const overridden = recommended !== null && b.disposition !== recommended;
    if (overridden && !b.reason.trim())
      throw new AppError(400, "reason_required", `Tideline recommends "${recommended}"; say why you chose otherwise.`, {
        reason: "Give the reason for overriding the recommendation",
      });
    const now = new Date();
    const patch = {
      disposition: b.disposition,
      dispositionReason: b.reason,
      dispositionRecommended: recommended,
      dispositionOverridden: overridden,
      dispositionBy: actorId,
      dispositionAt: now,
    };
    const component = await updateVersioned(trx, "components", siteId, componentId, b.version, patch, "component");
    const decision = await repo.insertDecision(trx, {
      siteId,
      componentId,
      disposition: b.disposition,
      recommended,
      overridden,
      reason: b.reason,
      decidedBy: actorId,
      decidedAt: now,
    });
    await recordAudit(trx, {
      siteId,
      entityType: "component",
      entityId: componentId,
      boardId: await boardOf(trx, before.positionId),
      positionId: before.positionId,
      action: "disposition",
      actorId,
      before: {
        disposition: before.disposition,
        dispositionReason: before.dispositionReason,
        dispositionOverridden: before.dispositionOverridden,
      },
      after: {
        disposition: b.disposition,
        dispositionReason: b.reason,
        recommended,
        dispositionOverridden: overridden,
      },
    });
    if (b.disposition !== before.disposition) {
      await demandChanged(trx, siteId, { componentIds: [componentId] }, actorId);
      await refreshBoardSummaries(trx, [await boardOf(trx, before.positionId)]);
    }
    return { component, decision, recommendation };
  });
}

export async function recommendation(db: Db, siteId: string, componentId: string) {
  return recommendFor(db, siteId, await requireOwned(db, "components", siteId, componentId, "That component"));
}

/** Everything the side panel shows for one position. */
export async function positionDetail(db: Db, siteId: string, positionId: string) {
  const position = await requireOwned(db, "positions", siteId, positionId, "That position");
  const board = await requireOwned(db, "boards", siteId, position.boardId, "That board");
  const section = position.sectionId ? await boards.sectionBrief(db, position.sectionId) : undefined;
  const component = (await positions.currentComponent(db, positionId)) ?? null;
  const [inspections, history, counts] = await Promise.all([
    repo.inspectionsOfPosition(db, positionId),
    repo.historyOfPosition(db, positionId),
    repo.positionCounts(db, positionId),
  ]);
  return {
    position,
    board: {
      id: board.id,
      name: board.name,
      waterLineMm: board.waterLineMm,
      faceHeightMm: board.faceHeightMm,
      gridRows: board.gridRows,
      gridCols: board.gridCols,
    },
    section: section ?? null,
    component,
    recommendation: component ? await recommendFor(db, siteId, component) : null,
    inspections,
    custodyMoves: component ? await repo.movesOfComponent(db, component.id) : [],
    dispositions: component ? await repo.decisionsOfComponent(db, component.id) : [],
    history,
    photoCount: Number(counts.photoCount ?? 0),
    openDefectCount: Number(counts.openDefectCount ?? 0),
  };
}

/**
 * The verdict a refit goes by: that of each conductor pair's latest reading, the worst of them (a failing phase is
 * not hidden by a later reading of another phase that meets); null when there is none.
 */
function worstOf(verdicts: Verdict[]): Verdict | null {
  if (verdicts.length === 0) return null;
  return (
    verdicts.find((v) => v === "below_minimum" || v === "investigate") ??
    verdicts.find((v) => v === "not_valid") ??
    "meets"
  );
}
