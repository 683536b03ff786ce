/**
 * Demo seed step: MV Kestrel Lantern's main switchboard (invented) part way through its
 * return to service, dated relative to the day the demo is loaded ("today"):
 * 1. the bus-tie stage, at reduced voltage from the temporary feed: its first attempt
 *    stopped when the temporary fuse blew (an incident that opened a defect, since
 *    repaired and closed); the second attempt released after a week under watch;
 * 2. the first power-distribution feeders, energised today at full voltage from the
 *    temporary feed with the watch in progress, its insulation hold point released by the
 *    curator with a reason (one spare circuit left dead);
 * 3. two lighting circuits, blocked by two named reasons (a reading too old, an open
 *    safety-critical defect).
 * Qualified persons: Ines Marrow (current) and Rufus Lade (expired). All names invented.
 */
import type { Insertable, Kysely } from "kysely";
import type { Database, RtsSignoffsTable } from "../../db/types";
import type { SeedContext } from "./context";
import { DEFAULT_TEMPLATE, QUALIFIED_ONLY_KINDS, type StepKind } from "../../src/domain/return-to-service";
import { priorityScore } from "../../src/domain/priority";
import { localDate } from "../../src/domain/local-time";
import { onSiteClock } from "./clock";
import { DEMO_SITE } from "./people";

type Db = Kysely<Database>;
const MAIN = "Main switchboard (engine room, aft)";
const HOUR = 3_600_000;
/** A demo watch check reached the server as it was made (with signal): received 20 s after, not at seed time. */
const receivedAtOnce = <C extends { at: Date }>(c: C) => ({ ...c, createdAt: new Date(c.at.getTime() + 20_000) });
const DAY = 24 * HOUR;

export async function seedReturnToService(db: Db, ctx: SeedContext, now = new Date()) {
  const { siteId } = ctx;
  const board = await db
    .selectFrom("boards")
    .select("id")
    .where("siteId", "=", siteId)
    .where("name", "=", MAIN)
    .executeTakeFirst();
  if (!board) return;
  const ines = ctx.people["curator@tideline.test"];
  const tobias = ctx.people["volunteer@tideline.test"];
  const rufus = ctx.people["scrounger@tideline.test"];
  const names: Record<string, string> = { [ines]: "Ines Marrow", [tobias]: "Tobias Quell" };
  const todayStart = Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate());
  // `daysAgo` days before today on the site's calendar, at `hour`:`minute` on its clock.
  const [y, m, d] = localDate(now, DEMO_SITE.timeZone).split("-").map(Number);
  const day = (daysAgo: number, hour: number, minute = 0) => onSiteClock(y, m - 1, d - daysAgo, hour, minute);
  const dateOnly = (ms: number) => new Date(ms).toISOString().slice(0, 10);

  await db
    .insertInto("rtsQualifiedPersons")
    .values([
      {
        siteId,
        userId: ines,
        qualification:
          "Marine electrical officer's certificate (fictional no. KL-QP-0412); arc-flash training refreshed this year",
        expiresOn: dateOnly(todayStart + 210 * DAY),
        updatedBy: ines,
      },
      {
        siteId,
        userId: rufus,
        qualification: "Shore-power electrician's card (fictional)",
        expiresOn: dateOnly(todayStart - 30 * DAY),
        updatedBy: ines,
      },
    ])
    .execute();

  const positions = await db
    .selectFrom("positions as p")
    .leftJoin("sections as s", "s.id", "p.sectionId")
    .leftJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .select(["p.id", "p.designation", "p.circuit", "p.kind", "s.name as section", "c.id as componentId"])
    .where("p.boardId", "=", board.id)
    .orderBy("p.gridRow")
    .orderBy("p.gridCol")
    .execute();
  const byDes = new Map(positions.map((p) => [p.designation, p]));
  const flagged = new Set(
    (
      await db
        .selectFrom("defects")
        .select("positionId")
        .where("boardId", "=", board.id)
        .where("status", "not in", ["closed", "accepted_as_is"])
        .where((eb) => eb.or([eb("safetyCritical", "=", true), eb("blocksEnergisation", "=", true)]))
        .execute()
    ).map((d) => d.positionId),
  );
  const clean = (p: (typeof positions)[number]) => !!p.componentId && !flagged.has(p.id);

  // ---- the plan ----
  const stage = (v: {
    name: string;
    sortOrder: number;
    supply: "temporary_fused";
    voltageStep: "reduced" | "full";
    stepVolts: number;
    watchHours: number;
    checkEveryHours: number;
    dependsOnId?: string;
    notes: string;
  }) =>
    db
      .insertInto("rtsStages")
      .values({
        siteId,
        boardId: board.id,
        protectionDevice: "Fused disconnect on the temporary feed from the shore box",
        protectionRatingA: 20,
        protectionLimitA: 30,
        qualifiedPersonId: ines,
        ...v,
      })
      .returningAll()
      .executeTakeFirstOrThrow();
  const s1 = await stage({
    name: "Bus section A, bus tie and bus section B",
    sortOrder: 1,
    supply: "temporary_fused",
    voltageStep: "reduced",
    stepVolts: 230,
    watchHours: 168,
    checkEveryHours: 12,
    notes: "Bus only, every feeder open and tagged. A week under watch before any feeder.",
  });
  const s2 = await stage({
    name: "Power distribution, first feeders",
    sortOrder: 2,
    supply: "temporary_fused",
    voltageStep: "full",
    stepVolts: 450,
    watchHours: 24,
    checkEveryHours: 2,
    dependsOnId: s1.id,
    notes: "The first row of power feeders; each load disconnected at its starter.",
  });
  const s3 = await stage({
    name: "Lighting distribution, first circuits",
    sortOrder: 3,
    supply: "temporary_fused",
    voltageStep: "full",
    stepVolts: 450,
    watchHours: 24,
    checkEveryHours: 4,
    dependsOnId: s1.id,
    notes: "",
  });

  const busPositions = ["BUS-A", "BT-1", "BUS-B"].map((d) => byDes.get(d)!).filter(Boolean);
  // Feeders without the dry-out series of the readings step (1-1, 1-2), whose history stays as it is.
  const power = positions
    .filter(
      (p) =>
        p.section === "Power distribution" &&
        /^1-/.test(p.designation) &&
        !["1-1", "1-2"].includes(p.designation) &&
        clean(p),
    )
    .slice(0, 6);
  const lighting = positions.filter((p) => p.section === "Lighting distribution" && p.componentId);
  const lightDefect = lighting.find((p) => flagged.has(p.id));
  const lightOld = lighting.find((p) => clean(p) && p.kind === "molded_case_breaker");
  const s3Positions = [lightOld, lightDefect].filter((p): p is NonNullable<typeof p> => !!p);
  await db
    .insertInto("rtsStageItems")
    .values([
      ...busPositions.map((p) => ({ siteId, stageId: s1.id, sectionId: null, positionId: p.id })),
      ...power.map((p) => ({ siteId, stageId: s2.id, sectionId: null, positionId: p.id })),
      ...s3Positions.map((p) => ({ siteId, stageId: s3.id, sectionId: null, positionId: p.id })),
    ])
    .execute();
  if (!lightDefect) await db.updateTable("rtsStages").set({ protectionRatingA: 63 }).where("id", "=", s3.id).execute(); // a second named reason

  const stepIds: Record<string, Record<StepKind, string>> = {};
  for (const s of [s1, s2, s3]) {
    const rows = await db
      .insertInto("rtsSteps")
      .values(
        DEFAULT_TEMPLATE.map((t, i) => ({
          siteId,
          stageId: s.id,
          sortOrder: i + 1,
          kind: t.kind,
          title: t.title,
          detail: t.detail,
          qualifiedOnly: QUALIFIED_ONLY_KINDS.has(t.kind),
        })),
      )
      .returning(["id", "kind"])
      .execute();
    stepIds[s.id] = Object.fromEntries(rows.map((r) => [r.kind, r.id])) as Record<StepKind, string>;
  }
  const signoffs: Insertable<RtsSignoffsTable>[] = [];
  const signAll = (
    stageId: string,
    attempt: number,
    plan: Array<[StepKind, string, Date, { kind?: "signed" | "released"; reason?: string; note?: string }?]>,
  ) => {
    for (const [kind, who, at, extra] of plan)
      signoffs.push({
        siteId,
        stageId,
        stepId: stepIds[stageId][kind],
        attempt,
        kind: extra?.kind ?? "signed",
        signedBy: who,
        signerName: names[who],
        signedAt: at,
        reason: extra?.reason ?? "",
        note: extra?.note ?? "",
      });
  };

  // ---- evidence: insulation readings before each energisation ----
  const ir = (componentId: string, megohms: number, at: Date, note = "") => ({
    siteId,
    boardId: board.id,
    componentId,
    testVoltsDc: 1000,
    megohms,
    conductors: "A-G" as const,
    equipmentTempC: 20,
    ambientTempC: 17,
    humidityPercent: 55,
    durationS: 60,
    instrument: "Insulation tester IT-5 (fictional), serial 0412",
    notes: note,
    measuredAt: at,
    recordedBy: tobias,
  });
  const readings = [
    ...busPositions
      .filter((p) => p.designation !== "BUS-A")
      .flatMap((p, k) => [
        ir(p.componentId!, 380 + k * 40, day(11, 15, k * 10)),
        ir(p.componentId!, 420 + k * 40, day(9, 7, k * 10), "Before the second attempt"),
      ]),
    ...power.slice(0, -1).map((p, k) => ir(p.componentId!, 260 + k * 55, day(1, 15, k * 8))),
    ...(lightOld
      ? [ir(lightOld.componentId!, 310, day(12, 14), "Megged with the rest of the lighting row; not since.")]
      : []),
    ...(lightDefect ? [ir(lightDefect.componentId!, 290, day(1, 16))] : []),
  ];
  await db.insertInto("insulationReadings").values(readings).execute();

  // ---- stage 1, attempt 1: energised, the temporary fuse blew ----
  const e1 = day(10, 10);
  signAll(s1.id, 1, [
    ["isolate", tobias, day(10, 8)],
    ["insulation", ines, day(10, 8, 20)],
    ["defects", ines, day(10, 8, 30)],
    ["protection", tobias, day(10, 9)],
    ["clearance", ines, day(10, 9, 50)],
    ["energise", ines, e1],
  ]);
  const bt = byDes.get("BT-1")!;
  const blew = day(10, 10, 40);
  const btHeritage = (
    await db.selectFrom("components").select("heritage").where("id", "=", bt.componentId!).executeTakeFirst()
  )?.heritage;
  const { score } = priorityScore({
    severity: "disabling",
    safetyCritical: true,
    blocksEnergisation: true,
    originalFabric: btHeritage === "original",
    effortHours: 6,
    partsAvailable: "none_needed",
  });
  const defect = await db
    .insertInto("defects")
    .values({
      siteId,
      boardId: board.id,
      positionId: bt.id,
      componentId: bt.componentId,
      title: "Return to service incident: temporary fuse on phase B blew 40 min after energising the bus",
      description:
        "Phase B fuse of the temporary feed blew. Found tracking across the line-side insulator of the bus tie, under a salt crust missed in the wash.\n\nOpened automatically by the return-to-service log; the stage was stopped until it was dealt with.",
      category: "wiring",
      severity: "disabling",
      safetyCritical: true,
      blocksEnergisation: true,
      effortHours: 6,
      status: "closed",
      repairedBy: tobias,
      verifiedBy: ines,
      closedAt: day(9, 7),
      createdBy: tobias,
      priorityScore: score,
      createdAt: blew,
      updatedAt: day(9, 7),
    })
    .returning(["id"])
    .executeTakeFirstOrThrow();
  await db
    .insertInto("defectStatusChanges")
    .values([
      { siteId, defectId: defect.id, fromStatus: null, toStatus: "raised", actorId: tobias, at: blew, reason: "" },
      {
        siteId,
        defectId: defect.id,
        fromStatus: "raised",
        toStatus: "under_repair",
        actorId: tobias,
        at: day(10, 13),
        reason: "",
      },
      {
        siteId,
        defectId: defect.id,
        fromStatus: "under_repair",
        toStatus: "awaiting_retest",
        actorId: tobias,
        at: day(10, 17),
        reason: "",
      },
      {
        siteId,
        defectId: defect.id,
        fromStatus: "awaiting_retest",
        toStatus: "closed",
        actorId: ines,
        at: day(9, 7),
        reason: "Insulator cleaned and dried; re-megged 420 MΩ.",
      },
    ])
    .execute();
  await db
    .insertInto("rtsIncidents")
    .values({
      siteId,
      boardId: board.id,
      stageId: s1.id,
      attempt: 1,
      at: blew,
      kind: "protection_operated",
      positionId: bt.id,
      defectId: defect.id,
      summary: "Temporary feed fuse on phase B blew on “Bus section A, bus tie and bus section B”",
      note: "Smell of hot dust near the bus tie before it went.",
      recordedBy: tobias,
    })
    .execute();

  // ---- stage 1, attempt 2: released after a week under watch ----
  const e2 = day(9, 9, 30);
  signAll(s1.id, 2, [
    ["isolate", tobias, day(9, 8)],
    ["insulation", ines, day(9, 8, 10)],
    ["defects", ines, day(9, 8, 15)],
    ["protection", tobias, day(9, 8, 40), { note: "New 20 A fuses fitted, all three phases." }],
    ["clearance", ines, day(9, 9, 25)],
    ["energise", ines, e2],
    ["ground_lamps", tobias, day(9, 9, 40), { note: "Three equal lamps." }],
    ["thermal", tobias, day(9, 13, 10)],
    ["watch", ines, day(2, 9, 40)],
    ["release", ines, day(2, 10)],
  ]);
  const checks1 = Array.from({ length: 14 }, (_, k) => ({
    siteId,
    stageId: s1.id,
    attempt: 2,
    at: new Date(e2.getTime() + (k + 1) * 12 * HOUR - 20 * 60_000),
    lamps: "equal" as const,
    warmToHand: false,
    note: k === 0 ? "Quiet; no smell." : "",
    recordedBy: k % 3 === 0 ? ines : tobias,
  }));
  const firstLook = {
    siteId,
    stageId: s1.id,
    attempt: 2,
    at: day(9, 9, 35),
    lamps: "equal" as const,
    note: "First sign of life: three equal lamps.",
    recordedBy: tobias,
  };
  await db
    .insertInto("rtsWatchChecks")
    .values([firstLook, ...checks1].map(receivedAtOnce))
    .execute();
  await db
    .insertInto("thermalScans")
    .values({
      siteId,
      boardId: board.id,
      componentId: bt.componentId!,
      componentTempC: 24.5,
      similarTempC: 24,
      ambientTempC: 21,
      loadPercent: 5,
      measuredAt: day(9, 13),
      instrument: "Thermal camera TC-3 (fictional)",
      notes: "Bus tie after warm-up; feeder traced, nothing local.",
      recordedBy: tobias,
    })
    .execute();

  // ---- stage 2: energised today at full voltage, under watch ----
  const e3 = new Date(Math.max(todayStart + 5 * 60_000, now.getTime() - 3 * HOUR));
  const before = (min: number) => new Date(e3.getTime() - min * 60_000);
  const spare = power.at(-1);
  signAll(s2.id, 1, [
    ["isolate", tobias, before(120)],
    [
      "insulation",
      ines,
      before(100),
      {
        kind: "released",
        reason: spare
          ? `${spare.designation} (${spare.circuit}) has no recent reading: left open, tagged and its outgoing cable disconnected at the terminals, so it is not energised in this stage. Megger it before its own stage.`
          : "Released for the demo.",
      },
    ],
    ["defects", ines, before(90)],
    ["protection", tobias, before(80), { note: "20 A fuses checked in the fused disconnect." }],
    ["clearance", ines, before(15)],
    ["energise", ines, e3],
    ["ground_lamps", tobias, new Date(e3.getTime() + 10 * 60_000), { note: "Three equal lamps." }],
  ]);
  const checks2 = [
    {
      siteId,
      stageId: s2.id,
      attempt: 1,
      at: new Date(e3.getTime() + 5 * 60_000),
      lamps: "equal" as const,
      note: "First sign of life: three equal lamps.",
      recordedBy: tobias,
    },
    {
      siteId,
      stageId: s2.id,
      attempt: 1,
      at: new Date(e3.getTime() + 2 * HOUR),
      lamps: "equal" as const,
      warmToHand: true,
      note: "Feeder 1 lugs warm to the hand, no smell.",
      recordedBy: tobias,
    },
  ].filter((c) => c.at.getTime() <= now.getTime());
  await db.insertInto("rtsWatchChecks").values(checks2.map(receivedAtOnce)).execute();

  // ---- the log: energisations and breaker operations ----
  const ev = (
    stageId: string,
    attempt: number,
    kind: "energise" | "de_energise",
    at: Date,
    volts: number | null,
    note: string,
  ) => ({
    siteId,
    boardId: board.id,
    stageId,
    attempt,
    kind,
    at,
    supply: "temporary_fused" as const,
    volts,
    protectionDevice: "Fused disconnect on the temporary feed from the shore box",
    protectionRatingA: 20,
    note,
    recordedBy: ines,
  });
  await db
    .insertInto("rtsEnergisations")
    .values([
      ev(s1.id, 1, "energise", e1, 230, "From outside the arc-flash boundary, at the shore box."),
      ev(s1.id, 1, "de_energise", blew, null, "Protection operated"),
      ev(s1.id, 2, "energise", e2, 230, ""),
      ev(s2.id, 1, "energise", e3, 450, "Full voltage from the temporary feed."),
    ])
    .execute();
  const op = (componentId: string, operation: "open" | "close", at: Date, why: string, stageId: string | null) => ({
    siteId,
    boardId: board.id,
    componentId,
    stageId,
    operation,
    at,
    why,
    operatedBy: tobias,
  });
  await db
    .insertInto("rtsBreakerOperations")
    .values([
      op(bt.componentId!, "close", day(10, 9, 55), "Close the tie to bring bus section B with A", s1.id),
      op(bt.componentId!, "open", day(10, 11), "Opened after the fuse blew, for the inspection", s1.id),
      op(bt.componentId!, "close", day(9, 9, 20), "Second attempt", s1.id),
      ...power.slice(0, -1).map((p) => op(p.componentId!, "close", before(5), "Close the feeder for the stage", s2.id)),
      ...(power[0]
        ? [
            op(power[0].componentId!, "open", day(4, 10), "Exercised on the bench after the rebuild", null),
            op(power[0].componentId!, "close", day(4, 10, 5), "Exercised on the bench after the rebuild", null),
          ]
        : []),
    ])
    .execute();

  await db.insertInto("rtsSignoffs").values(signoffs).execute();
  await db
    .updateTable("rtsStages")
    .set({ status: "released", attempt: 2, energisedAt: e2, releasedAt: day(2, 10) })
    .where("id", "=", s1.id)
    .execute();
  await db.updateTable("rtsStages").set({ status: "energised", energisedAt: e3 }).where("id", "=", s2.id).execute();
}
