import { describe, expect, it } from "vitest";
import {
  allowedTargets,
  canEdit,
  checkTransition,
  type Actor,
  type WorkflowDefect,
} from "../../src/domain/defect-workflow";
import type { DefectStatus } from "../../src/domain/vocab";

// Tideline's own workflow rules; independent verification of a repair by a
// second person is common practice, no published source.
const VOL = "vol-1";
const OTHER = "vol-2";
const CUR = "cur-1";
const volunteer: Actor = { id: VOL, role: "volunteer" };
const otherVolunteer: Actor = { id: OTHER, role: "volunteer" };
const curator: Actor = { id: CUR, role: "curator" };
const viewer: Actor = { id: "v", role: "viewer" };
const scrounger: Actor = { id: "s", role: "scrounger" };
const d = (status: DefectStatus, over: Partial<WorkflowDefect> = {}): WorkflowDefect => ({
  status,
  createdBy: VOL,
  assigneeId: null,
  repairedBy: null,
  ...over,
});

describe("checkTransition", () => {
  it.each([
    // [case, defect, to, actor, reason, expected ok or error code]
    ["volunteer starts their own open defect", d("raised"), "under_repair", volunteer, undefined, true],
    [
      "volunteer sends their own repair for verification",
      d("under_repair"),
      "awaiting_retest",
      volunteer,
      undefined,
      true,
    ],
    [
      "volunteer starts a scheduled defect assigned to them",
      d("scheduled", { createdBy: CUR, assigneeId: OTHER }),
      "under_repair",
      otherVolunteer,
      undefined,
      true,
    ],
    [
      "volunteer cannot move someone else's defect",
      d("raised"),
      "under_repair",
      otherVolunteer,
      undefined,
      "forbidden",
    ],
    ["volunteer cannot triage", d("raised"), "scheduled", volunteer, undefined, "forbidden"],
    [
      "volunteer cannot close even another's repair",
      d("awaiting_retest", { repairedBy: OTHER }),
      "closed",
      volunteer,
      undefined,
      "forbidden",
    ],
    ["volunteer cannot defer", d("raised"), "deferred", volunteer, "later", "forbidden"],
    ["viewer moves nothing", d("raised"), "scheduled", viewer, undefined, "forbidden"],
    ["scrounger moves nothing", d("raised"), "under_repair", scrounger, undefined, "forbidden"],
    ["curator triages", d("raised"), "scheduled", curator, undefined, true],
    [
      "curator closes a repair done by someone else",
      d("awaiting_retest", { repairedBy: VOL }),
      "closed",
      curator,
      undefined,
      true,
    ],
    [
      "curator cannot close their own repair",
      d("awaiting_retest", { repairedBy: CUR }),
      "closed",
      curator,
      undefined,
      "same_person",
    ],
    ["closing needs a recorded repairer", d("awaiting_retest"), "closed", curator, undefined, "no_repairer"],
    ["deferring needs a reason", d("raised"), "deferred", curator, "  ", "reason_required"],
    ["deferring with a reason", d("scheduled"), "deferred", curator, "Wait for the dry-out", true],
    ["won't fix needs a reason", d("raised"), "accepted_as_is", curator, "", "reason_required"],
    ["open cannot jump to closed", d("raised"), "closed", curator, undefined, "not_allowed"],
    ["closed can only reopen", d("closed", { repairedBy: VOL }), "under_repair", curator, undefined, "not_allowed"],
    ["curator reopens a closed defect", d("closed", { repairedBy: VOL }), "raised", curator, undefined, true],
    ["admin acts as curator", d("raised"), "scheduled", { id: "a", role: "admin" } as Actor, undefined, true],
  ] as Array<[string, WorkflowDefect, DefectStatus, Actor, string | undefined, true | string]>)(
    "%s",
    (_c, defect, to, actor, reason, expected) => {
      const r = checkTransition(defect, to, actor, { reason, evidence: { retestsMeeting: 1, afterPhotos: 0 } });
      if (expected === true) expect(r.ok).toBe(true);
      else expect(r.ok ? "ok" : r.code).toBe(expected);
    },
  );

  it("records the volunteer as the doer when they send a repair for verification", () => {
    const r = checkTransition(d("under_repair", { assigneeId: OTHER }), "awaiting_retest", volunteer);
    expect(r).toEqual({ ok: true, set: { repairedBy: VOL } });
  });

  it("records the assignee as the doer when the curator sends it for verification", () => {
    const r = checkTransition(d("under_repair", { assigneeId: OTHER }), "awaiting_retest", curator);
    expect(r).toEqual({ ok: true, set: { repairedBy: OTHER } });
  });

  it("records the curator as verifier on closing", () => {
    expect(
      checkTransition(d("awaiting_retest", { repairedBy: VOL }), "closed", curator, {
        evidence: { retestsMeeting: 0, afterPhotos: 1 },
      }),
    ).toEqual({ ok: true, set: { verifiedBy: CUR, closed: true } });
  });

  // A repair is closed on evidence (common practice: re-test or photograph the work).
  it.each([
    ["no evidence at all", undefined, "evidence_required"],
    [
      "a re-test that does not meet its criterion counts for nothing",
      { retestsMeeting: 0, afterPhotos: 0 },
      "evidence_required",
    ],
    ["a re-test meeting its criterion", { retestsMeeting: 1, afterPhotos: 0 }, "ok"],
    ["an after-work photo", { retestsMeeting: 0, afterPhotos: 2 }, "ok"],
  ] as const)("closing with %s", (_c, evidence, expected) => {
    const r = checkTransition(d("awaiting_retest", { repairedBy: VOL }), "closed", curator, { evidence });
    expect(r.ok ? "ok" : r.code).toBe(expected);
  });

  it("sending a repair back clears the doer", () => {
    const r = checkTransition(d("awaiting_retest", { repairedBy: VOL }), "under_repair", curator);
    expect(r.ok && r.set.repairedBy).toBeNull();
  });

  it("throws RangeError for an unknown status", () => {
    expect(() => checkTransition(d("raised"), "fixed" as DefectStatus, curator)).toThrow(RangeError);
  });
});

describe("allowedTargets and canEdit", () => {
  it.each([
    ["curator on open", d("raised"), curator, ["scheduled", "under_repair", "deferred", "accepted_as_is"]],
    ["own volunteer on open", d("raised"), volunteer, ["under_repair"]],
    ["own volunteer awaiting verification", d("awaiting_retest"), volunteer, []],
    [
      "the curator who did the repair is not offered the close",
      d("awaiting_retest", { repairedBy: CUR }),
      curator,
      ["under_repair", "deferred", "accepted_as_is"],
    ],
    [
      "another curator is",
      d("awaiting_retest", { repairedBy: VOL }),
      curator,
      ["closed", "under_repair", "deferred", "accepted_as_is"],
    ],
    ["other volunteer", d("raised"), otherVolunteer, []],
    ["viewer", d("raised"), viewer, []],
  ] as Array<[string, WorkflowDefect, Actor, DefectStatus[]]>)("%s", (_c, defect, actor, expected) => {
    expect(allowedTargets(defect, actor)).toEqual(expected);
  });

  it.each([
    ["curator edits any", d("closed"), curator, true],
    ["volunteer edits their own open defect", d("raised"), volunteer, true],
    ["volunteer cannot edit their own closed defect", d("closed"), volunteer, false],
    ["volunteer cannot edit another's", d("raised"), otherVolunteer, false],
    ["viewer cannot edit", d("raised"), viewer, false],
  ] as Array<[string, WorkflowDefect, Actor, boolean]>)("%s", (_c, defect, actor, expected) => {
    expect(canEdit(defect, actor)).toBe(expected);
  });
});
