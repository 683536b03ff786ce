/**
 * Who may move a defect from one status to another. Tideline's own rules (no external
 * source): volunteers raise defects and carry their own through the repair as the doer;
 * the curator triages, defers, closes and reopens; everyone else reads. Closing needs a
 * verifier who is not the person recorded as having done the repair — the common
 * practice of independent verification ("a second pair of eyes").
 */
import { DEFECT_STATUSES, type DefectStatus, type Role } from "./vocab";
import { can } from "./permissions";
import { requireOneOf } from "./guards";

export type Actor = { id: string; role: Role | "admin" };
export interface WorkflowDefect {
  status: DefectStatus;
  createdBy: string | null;
  assigneeId: string | null;
  repairedBy: string | null;
}

/** Statuses that take a written reason. */
export const REASON_REQUIRED: ReadonlySet<DefectStatus> = new Set(["deferred", "accepted_as_is"]);
/** Statuses the register calls "open work" (the repair plan lists these). */
export const ACTIVE_STATUSES: readonly DefectStatus[] = ["raised", "scheduled", "under_repair", "awaiting_retest"];

/** Curator (and instance admin) moves: from → allowed targets. */
const CURATOR_MOVES: Record<DefectStatus, DefectStatus[]> = {
  raised: ["scheduled", "under_repair", "deferred", "accepted_as_is"],
  scheduled: ["raised", "under_repair", "deferred", "accepted_as_is"],
  under_repair: ["scheduled", "awaiting_retest", "deferred", "accepted_as_is"],
  awaiting_retest: ["closed", "under_repair", "deferred", "accepted_as_is"],
  closed: ["raised"],
  deferred: ["raised", "scheduled"],
  accepted_as_is: ["raised"],
};
/** Volunteer moves, only on a defect they raised or were assigned. */
const VOLUNTEER_MOVES: Partial<Record<DefectStatus, DefectStatus[]>> = {
  raised: ["under_repair"],
  scheduled: ["under_repair"],
  under_repair: ["awaiting_retest"],
};

export type TransitionResult =
  | { ok: true; set: { repairedBy?: string | null; verifiedBy?: string | null; closed?: boolean; reopened?: boolean } }
  | {
      ok: false;
      code: "forbidden" | "not_allowed" | "reason_required" | "same_person" | "no_repairer" | "evidence_required";
      message: string;
    };

/**
 * What proves a repair: re-test readings linked to the defect that meet their
 * criterion, and "after work" photos filed to it. Closing needs at least one (common practice:
 * a repair is closed on evidence, not on someone's word).
 */
export interface RepairEvidence {
  retestsMeeting: number;
  afterPhotos: number;
}

/** Targets `actor` may choose from `defect`'s current status (for the buttons on screen). */
export function allowedTargets(defect: WorkflowDefect, actor: Actor): DefectStatus[] {
  requireOneOf("status", defect.status, DEFECT_STATUSES);
  // The repairer is never offered the close: someone else verifies.
  if (can(actor.role, "defects.manage"))
    return CURATOR_MOVES[defect.status].filter((to) => !(to === "closed" && defect.repairedBy === actor.id));
  if (can(actor.role, "defects.raise") && (defect.createdBy === actor.id || defect.assigneeId === actor.id))
    return VOLUNTEER_MOVES[defect.status] ?? [];
  return [];
}

/**
 * Checks one move and says what it records. `repairedBy` on the way to verification is
 * the doer: the volunteer themself, or whoever the curator names (default: the assignee,
 * else the curator). Closing records the actor as verifier and refuses when they did the repair.
 * @throws RangeError for a status outside DEFECT_STATUSES
 */
export function checkTransition(
  defect: WorkflowDefect,
  to: DefectStatus,
  actor: Actor,
  opts: { reason?: string; repairedBy?: string | null; evidence?: RepairEvidence } = {},
): TransitionResult {
  requireOneOf("to", to, DEFECT_STATUSES);
  const targets = allowedTargets(defect, actor);
  if (
    to === "closed" &&
    defect.status === "awaiting_retest" &&
    defect.repairedBy === actor.id &&
    CURATOR_MOVES[defect.status].includes(to) &&
    can(actor.role, "defects.manage")
  )
    return {
      ok: false,
      code: "same_person",
      message: "Someone other than the person who did the repair must verify and close it.",
    };
  if (!targets.includes(to)) {
    const anyone = CURATOR_MOVES[defect.status].includes(to);
    return anyone
      ? { ok: false, code: "forbidden", message: `Your role cannot move this defect from ${defect.status} to ${to}.` }
      : { ok: false, code: "not_allowed", message: `A defect cannot go from ${defect.status} to ${to}.` };
  }
  if (REASON_REQUIRED.has(to) && !opts.reason?.trim())
    return {
      ok: false,
      code: "reason_required",
      message: "Say why: deferring a defect or accepting it as is needs a reason.",
    };
  if (to === "awaiting_retest") {
    const doer = actor.role === "volunteer" ? actor.id : (opts.repairedBy ?? defect.assigneeId ?? actor.id);
    return { ok: true, set: { repairedBy: doer } };
  }
  if (to === "closed") {
    if (!defect.repairedBy)
      return { ok: false, code: "no_repairer", message: "Nobody is recorded as having done the repair." };
    if (defect.repairedBy === actor.id)
      return {
        ok: false,
        code: "same_person",
        message: "Someone other than the person who did the repair must verify and close it.",
      };
    if (!opts.evidence || (opts.evidence.retestsMeeting === 0 && opts.evidence.afterPhotos === 0))
      return {
        ok: false,
        code: "evidence_required",
        message:
          "Close on evidence: link a re-test reading that meets its criterion, or file an “after work” photo to this defect.",
      };
    return { ok: true, set: { verifiedBy: actor.id, closed: true } };
  }
  if (defect.status === "closed" || (to === "under_repair" && defect.status === "awaiting_retest"))
    return {
      ok: true,
      set: {
        verifiedBy: null,
        repairedBy: defect.status === "closed" ? defect.repairedBy : null,
        reopened: defect.status === "closed",
      },
    };
  return { ok: true, set: {} };
}

/** Field edits: the curator on any defect, a volunteer on one they raised that is not closed (who triages, assigns,
 * pins and bulk-edits, and who raises, is in the permission table: `defects.manage`, `defects.raise`). */
export const canEdit = (d: WorkflowDefect, actor: Actor) =>
  can(actor.role, "defects.manage") ||
  (can(actor.role, "defects.raise") && d.createdBy === actor.id && d.status !== "closed");
