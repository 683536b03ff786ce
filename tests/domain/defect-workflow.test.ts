import { describe, expect, it } from "vitest";
import { allowedTargets, canEdit, checkTransition, type Actor, type WorkflowDefect } from "../../src/domain/defect-workflow";
import type { DefectStatus } from "../../src/domain/vocab";

// Tideline's own workflow rules (issue 5); independent verification of a repair by a
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
  status, createdBy: VOL, assigneeId: null, repairedBy: null, ...over,
});

describe("checkTransition", () => {
  it.each([
    // [case, defect, to, actor, reason, expected ok or error code]
    ["volunteer starts their own open defect", d("open"), "in_repair", volunteer, undefined, true],
    ["volunteer sends their own repair for verification", d("in_repair"), "awaiting_verification", volunteer, undefined, true],
    ["volunteer starts a triaged defect assigned to them", d("triaged", { createdBy: CUR, assigneeId: OTHER }), "in_repair", otherVolunteer, undefined, true],
    ["volunteer cannot move someone else's defect", d("open"), "in_repair", otherVolunteer, undefined, "forbidden"],
    ["volunteer cannot triage", d("open"), "triaged", volunteer, undefined, "forbidden"],
    ["volunteer cannot close even another's repair", d("awaiting_verification", { repairedBy: OTHER }), "closed", volunteer, undefined, "forbidden"],
    ["volunteer cannot defer", d("open"), "deferred", volunteer, "later", "forbidden"],
    ["viewer moves nothing", d("open"), "triaged", viewer, undefined, "forbidden"],
    ["scrounger moves nothing", d("open"), "in_repair", scrounger, undefined, "forbidden"],
    ["curator triages", d("open"), "triaged", curator, undefined, true],
    ["curator closes a repair done by someone else", d("awaiting_verification", { repairedBy: VOL }), "closed", curator, undefined, true],
    ["curator cannot close their own repair", d("awaiting_verification", { repairedBy: CUR }), "closed", curator, undefined, "same_person"],
    ["closing needs a recorded repairer", d("awaiting_verification"), "closed", curator, undefined, "no_repairer"],
    ["deferring needs a reason", d("open"), "deferred", curator, "  ", "reason_required"],
    ["deferring with a reason", d("triaged"), "deferred", curator, "Wait for the dry-out", true],
    ["won't fix needs a reason", d("open"), "wont_fix", curator, "", "reason_required"],
    ["open cannot jump to closed", d("open"), "closed", curator, undefined, "not_allowed"],
    ["closed can only reopen", d("closed", { repairedBy: VOL }), "in_repair", curator, undefined, "not_allowed"],
    ["curator reopens a closed defect", d("closed", { repairedBy: VOL }), "open", curator, undefined, true],
    ["admin acts as curator", d("open"), "triaged", { id: "a", role: "admin" } as Actor, undefined, true],
  ] as Array<[string, WorkflowDefect, DefectStatus, Actor, string | undefined, true | string]>)("%s", (_c, defect, to, actor, reason, expected) => {
    const r = checkTransition(defect, to, actor, { reason });
    if (expected === true) expect(r.ok).toBe(true);
    else expect(r.ok ? "ok" : r.code).toBe(expected);
  });

  it("records the volunteer as the doer when they send a repair for verification", () => {
    const r = checkTransition(d("in_repair", { assigneeId: OTHER }), "awaiting_verification", volunteer);
    expect(r).toEqual({ ok: true, set: { repairedBy: VOL } });
  });

  it("records the assignee as the doer when the curator sends it for verification", () => {
    const r = checkTransition(d("in_repair", { assigneeId: OTHER }), "awaiting_verification", curator);
    expect(r).toEqual({ ok: true, set: { repairedBy: OTHER } });
  });

  it("records the curator as verifier on closing", () => {
    expect(checkTransition(d("awaiting_verification", { repairedBy: VOL }), "closed", curator)).toEqual({ ok: true, set: { verifiedBy: CUR, closed: true } });
  });

  it("sending a repair back clears the doer", () => {
    const r = checkTransition(d("awaiting_verification", { repairedBy: VOL }), "in_repair", curator);
    expect(r.ok && r.set.repairedBy).toBeNull();
  });

  it("throws RangeError for an unknown status", () => {
    expect(() => checkTransition(d("open"), "fixed" as DefectStatus, curator)).toThrow(RangeError);
  });
});

describe("allowedTargets and canEdit", () => {
  it.each([
    ["curator on open", d("open"), curator, ["triaged", "in_repair", "deferred", "wont_fix"]],
    ["own volunteer on open", d("open"), volunteer, ["in_repair"]],
    ["own volunteer awaiting verification", d("awaiting_verification"), volunteer, []],
    ["other volunteer", d("open"), otherVolunteer, []],
    ["viewer", d("open"), viewer, []],
  ] as Array<[string, WorkflowDefect, Actor, DefectStatus[]]>)("%s", (_c, defect, actor, expected) => {
    expect(allowedTargets(defect, actor)).toEqual(expected);
  });

  it.each([
    ["curator edits any", d("closed"), curator, true],
    ["volunteer edits their own open defect", d("open"), volunteer, true],
    ["volunteer cannot edit their own closed defect", d("closed"), volunteer, false],
    ["volunteer cannot edit another's", d("open"), otherVolunteer, false],
    ["viewer cannot edit", d("open"), viewer, false],
  ] as Array<[string, WorkflowDefect, Actor, boolean]>)("%s", (_c, defect, actor, expected) => {
    expect(canEdit(defect, actor)).toBe(expected);
  });
});
