import { describe, expect, it } from "vitest";
import { checkCustodyMove, proposeNext, type CustodyFacts } from "../../src/domain/custody-chain";
import type { Custody } from "../../src/domain/vocab";

// The tag-and-return chain is common practice of restoration crews (no published source);
// the kinds that need an insulation-resistance reading before refit follow the tests ANSI/NETA
// MTS-2019 section 7 lists for switchgear, transformers, switches and circuit breakers (from memory).
const ready: CustodyFacts = {
  from: "ready_to_refit",
  kind: "molded_case_breaker",
  disposition: "rebuild",
  tagNumber: "T-101",
  latestInsulation: "intact",
  latestMechanism: "free",
  latestReading: "meets",
};
const f = (over: Partial<CustodyFacts>): CustodyFacts => ({ ...ready, ...over });
const rules = (facts: CustodyFacts, to: Custody) => checkCustodyMove(facts, to).map((r) => r.rule);

describe("checkCustodyMove", () => {
  it.each<[string, CustodyFacts, Custody, string[]]>([
    ["removal with a tag is on the chain (common practice)", f({ from: "in_place" }), "removed", []],
    [
      "removal without a tag is refused (common practice: tag and bag)",
      f({ from: "in_place", tagNumber: null }),
      "removed",
      ["tag_required"],
    ],
    ["a blank tag counts as none", f({ from: "in_place", tagNumber: "  " }), "removed", ["tag_required"]],
    [
      "to the workshop from in place skips the removal (common practice)",
      f({ from: "in_place" }),
      "in_workshop",
      ["off_chain"],
    ],
    [
      "workshop → refitted skips ready-to-refit (a refit straight from the workshop)",
      f({ from: "in_workshop" }),
      "refitted",
      ["not_ready"],
    ],
    [
      "ready to refit needs a decided disposition (common practice)",
      f({ from: "in_workshop", disposition: null }),
      "ready_to_refit",
      ["disposition_undecided"],
    ],
    ["ready to refit with a decision", f({ from: "in_workshop" }), "ready_to_refit", []],
    ["a cleaned part may be made ready on site", f({ from: "removed", disposition: "clean" }), "ready_to_refit", []],
    ["refit with every proof", ready, "refitted", []],
    [
      "refit when the last inspection shows tracking",
      f({ latestInsulation: "tracking" }),
      "refitted",
      ["condition_unproven"],
    ],
    [
      "refit when the last inspection shows a seized mechanism",
      f({ latestMechanism: "seized" }),
      "refitted",
      ["condition_unproven"],
    ],
    [
      "a breaker without any insulation reading (NETA MTS §7.6, from memory)",
      f({ latestReading: null }),
      "refitted",
      ["reading_required"],
    ],
    [
      "a breaker whose latest reading is below the minimum",
      f({ latestReading: "below_minimum" }),
      "refitted",
      ["reading_failing"],
    ],
    [
      "a breaker whose latest reading was taken near the dew point (not valid for judging)",
      f({ latestReading: "not_valid" }),
      "refitted",
      ["reading_not_valid"],
    ],
    [
      "a bus section needs a reading too (NETA MTS §7.1, from memory)",
      f({ kind: "busbar", latestReading: null }),
      "refitted",
      ["reading_required"],
    ],
    [
      "a meter needs no reading (common practice: inspected, not megger-tested)",
      f({ kind: "meter", latestReading: null }),
      "refitted",
      [],
    ],
    ["a ground lamp needs no reading", f({ kind: "ground_lamp", latestReading: "below_minimum" }), "refitted", []],
    [
      "a refit with no proof at all lists every missing proof",
      f({ from: "in_workshop", disposition: null, latestInsulation: "tracking", latestReading: "below_minimum" }),
      "refitted",
      ["not_ready", "disposition_undecided", "condition_unproven", "reading_failing"],
    ],
    ["scrapped is the end of the chain", f({ from: "scrapped" }), "in_workshop", ["off_chain"]],
    ["a missing part found again goes back to the workshop", f({ from: "missing" }), "in_workshop", []],
    ["a refitted part can come off again, tagged", f({ from: "refitted" }), "removed", []],
    ["a move to the same state", f({ from: "removed" }), "removed", ["same_state"]],
  ])("%s", (_name, facts, to, expected) => {
    expect(rules(facts, to)).toEqual(expected);
  });

  it("answers 409 for a move off the chain and 422 for a missing proof; a missing tag and same_state cannot be released", () => {
    const r = checkCustodyMove(f({ from: "in_workshop", disposition: null }), "refitted");
    expect(r.map((x) => [x.rule, x.status, x.releasable])).toEqual([
      ["not_ready", 409, true],
      ["disposition_undecided", 422, true],
    ]);
    expect(checkCustodyMove(f({ from: "removed" }), "removed")[0]).toMatchObject({ status: 409, releasable: false });
    expect(checkCustodyMove(f({ from: "in_place", tagNumber: null }), "removed")[0]).toMatchObject({
      status: 422,
      releasable: false,
    });
  });

  it("throws RangeError for a state outside the list", () => {
    expect(() => checkCustodyMove(f({ from: "lost" as Custody }), "removed")).toThrow(RangeError);
  });
});

describe("proposeNext", () => {
  it.each<[string, CustodyFacts, Custody | null]>([
    ["in place → removed", f({ from: "in_place" }), "removed"],
    ["removed → workshop", f({ from: "removed", disposition: "rebuild" }), "in_workshop"],
    ["removed, to be cleaned → ready to refit", f({ from: "removed", disposition: "clean" }), "ready_to_refit"],
    [
      "workshop → ready to refit (even before the decision: the form then says what it needs)",
      f({ from: "in_workshop", disposition: null }),
      "ready_to_refit",
    ],
    ["ready → refitted", ready, "refitted"],
    ["after the refit nothing is proposed (not the previous move)", f({ from: "refitted" }), null],
    ["scrapped proposes nothing", f({ from: "scrapped" }), null],
    ["missing → removed (found, tagged)", f({ from: "missing" }), "removed"],
  ])("%s", (_n, facts, expected) => {
    expect(proposeNext(facts)).toBe(expected);
  });
});
