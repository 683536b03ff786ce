import { icuMinute } from "../helpers/icu";
import { describe, expect, it } from "vitest";
import { DEFAULT_TEMPLATE, checkReorder, isQualifiedOn } from "../../src/domain/return-to-service";
import { can } from "../../src/domain/permissions";
import { evaluateStage, insulationBlockers, type GateInput, type GateStep } from "../../src/domain/rts-gate";
import { watchSchedule } from "../../src/domain/rts-watch";
import { defaultOperationsBudget, operationsStatus } from "../../src/domain/breaker-operations";

const NOW = "2026-12-02T12:00:00.000Z";
const links = {
  circuitReadings: (c: { positionId: string }) => `/readings/${c.positionId}`,
  defect: (id: string) => `/defects/${id}`,
  crew: () => "/crew",
  stage: (id: string) => `/stage/${id}`,
  groundChecks: () => "/ground",
  watch: (id: string) => `/watch/${id}`,
};
const steps = (signed: string[] = []): GateStep[] =>
  DEFAULT_TEMPLATE.map((t, i) => ({
    id: `s${i}`,
    kind: t.kind,
    title: t.title,
    qualifiedOnly: t.kind === "energise" || t.kind === "release",
    current: signed.includes(t.kind)
      ? { id: `x${i}`, kind: "signed", signerName: "Ines Marrow", signedAt: "2026-12-02T08:00:00Z", reason: "" }
      : null,
  }));
const good = (): GateInput => ({
  stage: {
    id: "st",
    name: "Power distribution",
    status: "planned",
    supply: "temporary_fused",
    protectionDevice: "Fused disconnect",
    protectionRatingA: 20,
    protectionLimitA: 30,
    energisedAt: null,
    watchHours: 24,
    checkEveryHours: 4,
    qualifiedPerson: { userId: "u", name: "Ines Marrow", expiresOn: "2027-06-30", qualification: "Marine electrician" },
    dependsOn: null,
  },
  steps: steps(),
  circuits: [
    {
      positionId: "p1",
      designation: "1-1",
      circuit: "Steering gear",
      componentId: "c1",
      needsInsulation: true,
      readings: [
        { id: "r2", measuredAt: "2026-12-01T09:00:00Z", conductors: "A-G", verdict: "meets", correctedMegohms: 200 },
        { id: "r1", measuredAt: "2026-11-30T09:00:00Z", conductors: "A-G", verdict: "meets", correctedMegohms: 190 },
      ],
    },
  ],
  defects: [],
  lamps: {
    id: "g",
    at: "2026-12-01T10:00:00Z",
    suggestsGround: false,
    words: "All three alike.",
    source: "ground_check",
  },
  watchChecks: [],
  thermal: [],
  incidents: [],
  maxReadingAgeDays: 7,
  timeZone: "UTC",
  links,
});
const codes = (i: GateInput) => evaluateStage(i, NOW).blockers.map((b) => b.code);
const with_ = (f: (i: GateInput) => void) => {
  const i = good();
  f(i);
  return i;
};

describe("the gate before energising: one row per blocker (source beside each)", () => {
  it("with every piece of evidence in place, nothing blocks and the first hold point is ready to sign (common practice)", () => {
    const r = evaluateStage(good(), NOW);
    expect(r.blockers).toEqual([]);
    expect(r.state).toBe("preparing");
    expect(r.holdPoints[0]).toMatchObject({ kind: "isolate", state: "ready" });
    expect(r.holdPoints[1].state).toBe("waiting");
  });

  it.each<[string, (i: GateInput) => unknown, string, string]>([
    // [what, change, expected code, source]
    [
      "no insulation reading",
      (i: GateInput) => (i.circuits[0].readings = []),
      "insulation_missing",
      "common practice: prove every circuit before it is energised",
    ],
    [
      "latest reading older than D days",
      (i: GateInput) => (i.maxReadingAgeDays = 1),
      "insulation_old",
      "D per site, default 7 (common practice)",
    ],
    [
      "latest reading below the criterion",
      (i: GateInput) => (i.circuits[0].readings[0].verdict = "below_minimum"),
      "insulation_not_met",
      "ANSI/NETA MTS Table 100.1 via reading-judgement",
    ],
    [
      "latest reading fell more than 10 %",
      (i: GateInput) => (i.circuits[0].readings[0].correctedMegohms = 150),
      "insulation_fell",
      "common practice: a falling IR means moisture returning; 10 % Tideline's allowance",
    ],
    [
      "open safety-critical defect",
      (i: GateInput) =>
        i.defects.push({
          id: "d",
          ref: 7,
          title: "Arc track",
          designation: "1-1",
          safetyCritical: true,
          blocksEnergisation: false,
        }),
      "defect_open",
      "Tideline's gate (common practice)",
    ],
    [
      "open energisation-blocking defect",
      (i: GateInput) =>
        i.defects.push({
          id: "d",
          ref: 8,
          title: "Seized",
          designation: "1-1",
          safetyCritical: false,
          blocksEnergisation: true,
        }),
      "defect_open",
      "Tideline's gate (common practice)",
    ],
    [
      "protection above the stage's limit",
      (i: GateInput) => (i.stage.protectionRatingA = 63),
      "protection_above_limit",
      "common practice: temporary fused feed far below the board's rating",
    ],
    [
      "no protection rating recorded",
      (i: GateInput) => (i.stage.protectionRatingA = null),
      "protection_missing",
      "common practice",
    ],
    ["no limit set", (i: GateInput) => (i.stage.protectionLimitA = null), "protection_no_limit", "common practice"],
    [
      "no qualified person",
      (i: GateInput) => (i.stage.qualifiedPerson = null),
      "no_qualified_person",
      "NFPA 70E: qualified persons (Article 100 definition, from memory)",
    ],
    [
      "qualification expired",
      (i: GateInput) => (i.stage.qualifiedPerson!.expiresOn = "2026-12-01"),
      "qualification_expired",
      "NFPA 70E 110.2 training records (from memory)",
    ],
    [
      "qualified person's account suspended",
      (i: GateInput) => (i.stage.qualifiedPerson!.suspended = true),
      "qualified_person_suspended",
      "Tideline's own rule: a suspended account cannot sign in, so cannot sign (server/auth/suspension.ts)",
    ],
    [
      "latest lamp check suggests a ground",
      (i: GateInput) => (i.lamps!.suggestsGround = true),
      "ground_shown",
      "common practice: ground-detection lamps on an ungrounded system",
    ],
    [
      "the stage it depends on is not released",
      (i: GateInput) => (i.stage.dependsOn = { id: "a", name: "Bus tie", status: "energised" }),
      "depends_on",
      "Tideline's gate: stages follow their order",
    ],
  ])("%s → %s (source: %s)", (_what, change, code) => {
    const i = with_(change);
    const r = evaluateStage(i, NOW);
    expect(r.blockers.map((b) => b.code)).toEqual([code]);
    expect(r.state).toBe("blocked");
    expect(r.blockers[0].href).toMatch(/^\//);
  });

  it("a small wobble (within 10 %) is not a fall", () => {
    expect(codes(with_((i) => (i.circuits[0].readings[0].correctedMegohms = 175)))).toEqual([]);
  });
  it("a circuit whose kind takes no insulation test is not asked for one", () => {
    expect(codes(with_((i) => ((i.circuits[0].needsInsulation = false), (i.circuits[0].readings = []))))).toEqual([]);
  });
  it("a qualification that expires today still counts today", () => {
    expect(isQualifiedOn({ expiresOn: "2026-12-02" }, "2026-12-02")).toBe(true);
    expect(isQualifiedOn({ expiresOn: "2026-12-01" }, "2026-12-02")).toBe(false);
    expect(isQualifiedOn({ expiresOn: null }, "2026-12-02")).toBe(true);
  });

  it("combinations: each blocker lands on its own hold point, with links", () => {
    const i = with_((x) => {
      x.circuits[0].readings = [];
      x.defects.push({
        id: "d1",
        ref: 12,
        title: "Charred strip",
        designation: "1-1",
        safetyCritical: true,
        blocksEnergisation: true,
      });
      x.stage.protectionRatingA = 100;
      x.stage.qualifiedPerson = null;
    });
    const r = evaluateStage(i, NOW);
    const by = Object.fromEntries(r.holdPoints.map((h) => [h.kind, h.blockers.map((b) => b.code)]));
    expect(by).toMatchObject({
      isolate: [],
      insulation: ["insulation_missing"],
      defects: ["defect_open"],
      protection: ["protection_above_limit"],
      clearance: [],
      energise: ["no_qualified_person"],
    });
    expect(r.blockers.find((b) => b.code === "defect_open")!.href).toBe("/defects/d1");
    expect(r.blockers.find((b) => b.code === "defect_open")!.message).toContain("D-12");
  });

  it("when the curator removed the insulation hold point, its blocker moves to the energise step", () => {
    const i = with_((x) => {
      x.steps = x.steps.filter((s) => s.kind !== "insulation");
      x.circuits[0].readings = [];
    });
    expect(
      evaluateStage(i, NOW)
        .holdPoints.find((h) => h.kind === "energise")!
        .blockers.map((b) => b.code),
    ).toEqual(["insulation_missing"]);
  });

  it("a blocked hold point released with a reason counts as passed and is listed in red for ever", () => {
    const i = with_((x) => {
      x.circuits[0].readings = [];
      x.steps[0].current = { id: "a", kind: "signed", signerName: "T", signedAt: NOW, reason: "" };
      x.steps[1].current = {
        id: "b",
        kind: "released",
        signerName: "Ines Marrow",
        signedAt: NOW,
        reason: "Spare circuit, cable off",
      };
    });
    const r = evaluateStage(i, NOW);
    expect(r.holdPoints[1].state).toBe("released");
    expect(r.holdPoints[2].state).toBe("ready");
    expect(r.releasedWithReason).toEqual([
      expect.objectContaining({ reason: "Spare circuit, cable off", by: "Ines Marrow" }),
    ]);
  });

  it("with every pre-energisation hold point signed, the stage shows ready to energise (never 'safe')", () => {
    const r = evaluateStage(
      with_((x) => (x.steps = steps(["isolate", "insulation", "defects", "protection", "clearance"]))),
      NOW,
    );
    expect(r.state).toBe("ready_to_energise");
    expect(JSON.stringify(r)).not.toMatch(/\bsafe\b/i);
  });
  describe("evidence that changes under an entry before the energisation (common practice: a hold point attests to the evidence as it stood, and the energisation needs it to stand)", () => {
    const PRE = ["isolate", "insulation", "defects", "protection", "clearance"];
    it("a signed hold point with a blocker now is blocked again, says why, and nothing after it can be signed", () => {
      const i = with_((x) => {
        x.steps = steps(PRE);
        x.stage.protectionRatingA = 63; // edited after "Temporary protection" was signed at 20 A
      });
      const r = evaluateStage(i, NOW);
      const prot = r.holdPoints.find((h) => h.kind === "protection")!;
      expect(prot).toMatchObject({ state: "blocked", overtaken: true });
      expect(prot.signoff?.kind).toBe("signed");
      expect(prot.blockers.map((b) => b.code)).toEqual(["protection_above_limit"]);
      expect(r.holdPoints.find((h) => h.kind === "energise")!.state).toBe("waiting");
      expect(r.state).toBe("blocked");
      // The blocker goes (the rating put back): the signature counts again.
      expect(
        evaluateStage(
          with_((x) => (x.steps = steps(PRE))),
          NOW,
        ).state,
      ).toBe("ready_to_energise");
    });

    it("a release covers the blockers it saw, not one that appears after it; a release from before covers all", () => {
      const d51 = {
        id: "d51",
        ref: 51,
        title: "Lug re-made",
        designation: "4-1",
        safetyCritical: false,
        blocksEnergisation: true,
      };
      const d2 = {
        id: "d2",
        ref: 2,
        title: "Tracking on the line side",
        designation: "1-5",
        safetyCritical: true,
        blocksEnergisation: true,
      };
      const released = (covers: string[] | null) =>
        with_((x) => {
          x.steps = steps(["isolate", "insulation"]);
          x.steps[2].current = {
            id: "rel",
            kind: "released",
            signerName: "Ines Marrow",
            signedAt: NOW,
            reason: "D-51 lug re-made, checked",
            covers,
          };
          x.defects = [d51, d2];
        });
      const r = evaluateStage(released(["defect_open /defects/d51"]), NOW);
      const hp = r.holdPoints.find((h) => h.kind === "defects")!;
      expect(hp).toMatchObject({ state: "blocked", overtaken: true });
      expect(hp.blockers.map((b) => b.message)).toEqual([
        "D-2 open on 1-5: Tracking on the line side (safety-critical, blocks energisation).",
      ]);
      expect(hp.unsigned.blockers).toHaveLength(2);
      expect(r.holdPoints.find((h) => h.kind === "protection")!.state).toBe("waiting");
      expect(
        evaluateStage(released(["defect_open /defects/d51", "defect_open /defects/d2"]), NOW).holdPoints[2].state,
      ).toBe("released");
      expect(evaluateStage(released(null), NOW).holdPoints[2]).toMatchObject({ state: "released", overtaken: false });
    });

    it("once energised, pre-energisation entries stand as signed (judged as of the energisation)", () => {
      const i = with_((x) => {
        x.steps = steps([...PRE, "energise"]);
        x.stage.status = "energised";
        x.stage.energisedAt = "2026-12-02T10:00:00Z";
        x.defects = [
          {
            id: "d9",
            ref: 9,
            title: "Raised after",
            designation: "1-1",
            safetyCritical: true,
            blocksEnergisation: true,
          },
        ];
      });
      const r = evaluateStage(i, NOW);
      expect(r.holdPoints.find((h) => h.kind === "defects")).toMatchObject({
        state: "met",
        overtaken: false,
        blockers: [],
      });
    });

    it("says what the hold point would be with no entry in force (what a new signature or release must pass)", () => {
      const r = evaluateStage(
        with_((x) => ((x.steps = steps(["isolate"])), (x.circuits[0].readings = []))),
        NOW,
      );
      expect(r.holdPoints[0]).toMatchObject({ state: "met", unsigned: { state: "ready", blockers: [] } });
      expect(r.holdPoints[1].unsigned.state).toBe("blocked");
    });
  });

  it("a struck-out signature no longer counts", () => {
    const i = with_(
      (x) => (x.steps[0].current = { id: "a", kind: "struck", signerName: "T", signedAt: NOW, reason: "wrong board" }),
    );
    expect(evaluateStage(i, NOW).holdPoints[0].state).toBe("ready");
  });
});

describe("the gate after energising", () => {
  const live = (f: (i: GateInput) => void = () => {}) =>
    with_((x) => {
      x.steps = steps(["isolate", "insulation", "defects", "protection", "clearance", "energise"]);
      x.stage.status = "energised";
      x.stage.energisedAt = "2026-12-02T06:00:00Z";
      f(x);
    });
  it("pre-energisation evidence is judged as of the energisation (a reading 7 days old then is not re-judged now)", () => {
    const r = evaluateStage(
      live((x) => (x.circuits[0].readings[0].measuredAt = "2026-11-26T09:00:00Z")),
      "2026-12-05T12:00:00Z",
    );
    expect(r.holdPoints.find((h) => h.kind === "insulation")!.state).toBe("met");
  });
  it.each([
    [
      "no lamp check since energising",
      (x: GateInput) => (x.lamps!.at = "2026-12-01T10:00:00Z"),
      "ground_lamps",
      "lamps_not_checked",
    ],
    [
      "a dim lamp since energising",
      (x: GateInput) =>
        (x.lamps = {
          id: "w",
          at: "2026-12-02T07:00:00Z",
          suggestsGround: true,
          words: "one dim",
          source: "watch_check",
        }),
      "ground_lamps",
      "ground_shown",
    ],
    ["no thermal scan since energising", () => {}, "thermal", "thermal_missing"],
    [
      "a level-3 hot spot (NETA Table 100.18)",
      (x: GateInput) => x.thermal.push({ id: "t", at: "2026-12-02T08:00:00Z", level: 3, designation: "1-1" }),
      "thermal",
      "hot_spot",
    ],
  ])("%s → %s %s", (_w, f, kind, code) => {
    const r = evaluateStage(live(f as (x: GateInput) => void), NOW);
    expect(r.holdPoints.find((h) => h.kind === kind)!.blockers.map((b) => b.code)).toContain(code);
    expect(r.state).toBe("live");
  });
  it("the watch runs until its end and an overdue check shows", () => {
    const r = evaluateStage(live(), NOW);
    const w = r.holdPoints.find((h) => h.kind === "watch")!.blockers.map((b) => b.code);
    expect(w).toEqual(["watch_overdue", "watch_running"]);
  });
  it("the watch's times are written on the site's clock, the zone named (ICU's tz data as the reference)", () => {
    const onSite = (iso: string, zone: string) => `${icuMinute(iso, zone)} ${zone}`;
    for (const zone of ["UTC", "Europe/Lisbon", "Pacific/Auckland", "America/St_Johns"]) {
      const r = evaluateStage(
        live((x) => (x.timeZone = zone)),
        NOW,
      );
      const watch = r.holdPoints.find((h) => h.kind === "watch")!.blockers;
      // The fixture's watch: 24 h from energising at 06:00 UTC, a check every 4 h; none recorded, so one is overdue
      // since 10:00 UTC.
      expect(watch.find((b) => b.code === "watch_running")!.message).toBe(
        `The watch period runs until ${onSite("2026-12-03T06:00:00Z", zone)}.`,
      );
      expect(watch.find((b) => b.code === "watch_overdue")!.message).toBe(
        `A watch check was due at ${onSite("2026-12-02T10:00:00Z", zone)} and has not been recorded.`,
      );
    }
  });
  it("a qualification's last day is counted on the site's calendar", () => {
    // 20:00 UTC on 1 December is 09:00 on 2 December in Auckland (UTC+13), 20:00 on the 1st in UTC.
    const at = "2026-12-01T20:00:00.000Z";
    const lastDay = (zone: string) =>
      with_((i) => {
        i.timeZone = zone;
        i.stage.qualifiedPerson!.expiresOn = "2026-12-01";
      });
    expect(evaluateStage(lastDay("UTC"), at).blockers.map((b) => b.code)).not.toContain("qualification_expired");
    expect(evaluateStage(lastDay("Pacific/Auckland"), at).blockers.map((b) => b.code)).toContain(
      "qualification_expired",
    );
  });
  it("a stopped stage cannot be released", () => {
    const r = evaluateStage(
      live(
        (x) => (
          (x.stage.status = "stopped"),
          x.incidents.push({ id: "i", at: NOW, summary: "Fuse blew", defectId: "d9" })
        ),
      ),
      NOW,
    );
    expect(r.state).toBe("stopped");
    const rel = r.holdPoints.find((h) => h.kind === "release")!;
    expect(rel.blockers[0]).toMatchObject({ code: "stopped", href: "/defects/d9" });
  });
});

describe("watch schedule (common practice; 15 min grace is Tideline's)", () => {
  const base = { energisedAt: "2026-12-02T00:00:00Z", watchHours: 12, checkEveryHours: 4 };
  const at = (h: number) => Date.parse(base.energisedAt) + h * 3_600_000;
  it.each([
    [3, [], "2026-12-02T04:00:00.000Z", null],
    [4.2, [], "2026-12-02T04:00:00.000Z", null],
    [4.3, [], "2026-12-02T04:00:00.000Z", "2026-12-02T04:00:00.000Z"],
    [6, ["2026-12-02T03:30:00Z"], "2026-12-02T07:30:00.000Z", null],
  ])("at %s h with checks %j: next due %s, overdue since %s", (h, checks, next, overdue) => {
    const w = watchSchedule({ ...base, checks: checks as string[] }, at(h as number));
    expect(w.nextDueAt).toBe(next);
    expect(w.overdueSince).toBe(overdue);
  });
  it("a finished watch with a long gap lists it and is complete", () => {
    const w = watchSchedule({ ...base, checks: ["2026-12-02T04:00:00Z", "2026-12-02T11:00:00Z"] }, at(13));
    expect(w.complete).toBe(true);
    expect(w.gaps).toEqual([{ from: "2026-12-02T04:00:00.000Z", to: "2026-12-02T11:00:00.000Z" }]);
  });
  it("rejects an interval of zero", () =>
    expect(() => watchSchedule({ ...base, checkEveryHours: 0, checks: [] }, at(1))).toThrow(RangeError));
});

describe("insulation blockers directly", () => {
  it("throws on a reading age below one day", () =>
    expect(() => insulationBlockers([], Date.parse(NOW), 0, links)).toThrow(RangeError));

  // Each conductor pair on its own. Source: a trend compares readings taken the same way (IEEE Std 43 on trending
  // insulation resistance, from memory; common practice: phase to ground per phase, each phase its own history).
  type Pair = "A-G" | "B-G" | "C-G";
  type R = [id: string, daysAgo: number, conductors: Pair, verdict: "meets" | "below_minimum", mohm: number];
  const circuit = (...rs: R[]) => ({
    ...good().circuits[0],
    readings: rs.map(([id, daysAgo, conductors, verdict, correctedMegohms]) => ({
      id,
      measuredAt: new Date(Date.parse(NOW) - daysAgo * 86_400_000).toISOString(),
      conductors,
      verdict,
      correctedMegohms,
    })),
  });
  /** Newest first, as the gate is handed them. */
  const blockers = (...rs: R[]) =>
    insulationBlockers([circuit(...rs)], Date.parse(NOW), 7, links).map((b) => `${b.code}: ${b.message}`);

  it("phase B read lower than phase A just after it is not a fall: readings of different pairs do not compare", () =>
    expect(
      blockers(["b", 1, "B-G", "meets", 150], ["c", 1, "C-G", "meets", 260], ["a", 1, "A-G", "meets", 300]),
    ).toEqual([]));

  it("phase A below the criterion is not hidden by later readings of B and C that meet", () =>
    expect(
      blockers(["c", 1, "C-G", "meets", 260], ["b", 1, "B-G", "meets", 250], ["a", 2, "A-G", "below_minimum", 40]),
    ).toEqual([
      "insulation_not_met: 1-1 (Steering gear), A to ground: latest insulation reading does not meet the recorded criterion.",
    ]));

  it("a fall on phase A is seen across a reading of phase B between its two", () =>
    expect(
      blockers(["a2", 1, "A-G", "meets", 150], ["b", 2, "B-G", "meets", 400], ["a1", 2, "A-G", "meets", 300]),
    ).toEqual([
      "insulation_fell: 1-1 (Steering gear), A to ground: insulation resistance fell from 300 to 150 MΩ (corrected) since the reading before.",
    ]));

  it("a pair not read again for longer than the site allows is old, though the others are recent", () =>
    expect(
      blockers(["b", 1, "B-G", "meets", 250], ["a", 1, "A-G", "meets", 300], ["c", 12, "C-G", "meets", 300]),
    ).toEqual([
      "insulation_old: 1-1 (Steering gear), C to ground: latest insulation reading is 12 days old (the site asks for one within 7).",
    ]));

  it("one pair only: the message names the circuit alone, as before", () =>
    expect(blockers(["a2", 1, "A-G", "meets", 150], ["a1", 2, "A-G", "meets", 300])).toEqual([
      "insulation_fell: 1-1 (Steering gear): insulation resistance fell from 300 to 150 MΩ (corrected) since the reading before.",
    ]));
});

describe("plan order and permissions", () => {
  const stages = [
    { id: "a", dependsOnId: null, name: "Bus tie" },
    { id: "b", dependsOnId: "a", name: "Power" },
    { id: "c", dependsOnId: null, name: "Lighting" },
  ];
  it.each([
    ["b", 0, false],
    ["a", 2, false],
    ["c", 0, true],
    ["b", 2, true],
  ])("moving %s to %i: allowed %s", (id, to, ok) =>
    expect(checkReorder(stages, id as string, to as number).ok).toBe(ok),
  );
  it.each([
    ["viewer", "sign", false],
    ["volunteer", "sign", true],
    ["volunteer", "record_watch", true],
    ["volunteer", "plan", false],
    ["volunteer", "release_blocked", false],
    ["curator", "release_blocked", true],
    ["photographer", "record_watch", false],
    ["viewer", "read", true],
  ] as const)("%s may %s: %s", (role, action, ok) => expect(can(role, `rts.${action}`)).toBe(ok));
});

describe("breaker operations budget (Tideline's defaults; ANSI C37.50 endurance from memory does not apply to flooded old breakers)", () => {
  it.each([
    ["power_breaker", 1946, 10],
    ["molded_case_breaker", null, 10],
    ["molded_case_breaker", 1962, 50],
    ["bus_tie", 2010, 500],
  ] as const)("%s made %s → %i operations", (kind, year, n) =>
    expect(defaultOperationsBudget(kind, year)!.budget).toBe(n),
  );
  it("meters are not counted", () => expect(defaultOperationsBudget("meter", 1946)).toBeNull());
  it.each([
    [8, 10, 1, false, null],
    [
      10,
      10,
      1,
      true,
      "1 more operation would pass its budget (10 of 10 used). Consider energising from the temporary supply instead of operating it.",
    ],
    [
      11,
      10,
      0,
      false,
      "Operated 11 times against a budget of 10. Consider energising from the temporary supply instead of operating it.",
    ],
  ])("used %i of %i, %i planned: would exceed %s", (used, budget, planned, exceed, warning) => {
    const s = operationsStatus(used, budget, planned);
    expect(s.wouldExceed || s.overBudget).toBe(exceed || used > budget);
    expect(s.warning).toBe(warning);
  });
});
