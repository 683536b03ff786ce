/**
 * Demo seed step: test readings on MV Kestrel Lantern's main switchboard (invented).
 * A dry-out: three circuits megged daily for ten days while the board is heated, at the
 * temperatures of the day, resistance rising; pole contact resistance on rebuilt
 * breakers (one pole high); a thermal scan with a level-2 finding; two ground-lamp
 * checks, the second with phase B's lamp dim. Deterministic. Runs after seedInventory.
 */
import type { Kysely } from "kysely";
import type { Database } from "../../db/types";
import type { SeedContext } from "./context";
import { netaCorrectionFactor } from "../../src/domain/insulation";
import { onSiteClock } from "./clock";

type Db = Kysely<Database>;
const MAIN = "Main switchboard (engine room, aft)";
const at = (day: number, hour: number, minute = 0) => onSiteClock(2026, 10, 10 + day, hour, minute);
/** Board temperature on each morning of the dry-out, °C: heaters on and off, weather. */
const TEMPS = [14, 17, 22, 26, 19, 24, 28, 21, 25, 30];
/** Megohmmeter display: two significant figures below 100, whole megohms above. */
const display = (m: number) => (m < 100 ? Number(m.toPrecision(2)) : Math.round(m));

/** R20 rising by a doubling time, read at the day's temperature (raw = R20 / F(T)). */
const DRY_OUT = [
  {
    designation: "1-1",
    r20AtStart: 8,
    doublingDays: 2.2,
    wobble: [1, 1.08, 0.95, 1.05, 0.97, 1.02, 1.06, 0.96, 1.03, 1],
  },
  {
    designation: "1-2",
    r20AtStart: 3,
    doublingDays: 3.1,
    wobble: [1, 0.93, 1.07, 0.98, 1.04, 0.95, 1.02, 1.05, 0.97, 1],
  },
  {
    designation: "BUS-A",
    r20AtStart: 20,
    doublingDays: 2.6,
    wobble: [1, 1.04, 0.97, 1.02, 0.99, 1.05, 0.96, 1.01, 1.03, 1],
  },
];

async function componentsByDesignation(db: Db, boardId: string) {
  const rows = await db
    .selectFrom("positions as p")
    .innerJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .select(["p.designation", "c.id", "p.circuit"])
    .where("p.boardId", "=", boardId)
    .execute();
  return new Map(rows.map((r) => [r.designation, r]));
}

export async function seedReadings(db: Db, ctx: SeedContext) {
  const { siteId } = ctx;
  const board = await db
    .selectFrom("boards")
    .select("id")
    .where("siteId", "=", siteId)
    .where("name", "=", MAIN)
    .executeTakeFirst();
  if (!board) return; // the inventory step defines the boards; nothing to hang readings on
  const c = await componentsByDesignation(db, board.id);
  const volunteer = ctx.people["volunteer@tideline.test"];
  const curator = ctx.people["curator@tideline.test"];
  const common = {
    siteId,
    boardId: board.id,
    instrument: "Insulation tester IT-5 (fictional), serial 0412",
    recordedBy: volunteer,
  };

  const insulation = DRY_OUT.flatMap((s) =>
    TEMPS.map((t, day) => {
      const r20 = s.r20AtStart * Math.pow(2, day / s.doublingDays) * s.wobble[day];
      const comp = c.get(s.designation)!;
      return {
        ...common,
        componentId: comp.id,
        circuit: comp.circuit,
        testVoltsDc: 1000,
        megohms: display(r20 / netaCorrectionFactor(t, "solid")),
        conductors: "A-G" as const,
        equipmentTempC: t,
        ambientTempC: t - 3,
        humidityPercent: 78 - day * 2.5,
        durationS: 60,
        measuredAt: at(day, 8, 30 + DRY_OUT.indexOf(s) * 10),
        notes: day === 0 ? "First test after washing with deionised water; heaters and dehumidifier running." : "",
        r30sMegohms: null as number | null,
        r1minMegohms: null as number | null,
        r10minMegohms: null as number | null,
      };
    }),
  );
  // Timed readings on the last day for the bus section (PI = R10 / R1).
  const last = insulation[insulation.length - 1];
  Object.assign(last, {
    r30sMegohms: Math.round(last.megohms * 0.82),
    r1minMegohms: last.megohms,
    r10minMegohms: Math.round(last.megohms * 2.3),
    durationS: 600,
  });
  await db.insertInto("insulationReadings").values(insulation).execute();

  const contact = {
    siteId,
    boardId: board.id,
    instrument: "Low-resistance ohmmeter LR-10 (fictional)",
    testCurrentA: 100,
    recordedBy: curator,
  };
  await db
    .insertInto("contactReadings")
    .values([
      {
        ...contact,
        componentId: c.get("G1")!.id,
        poleMicroOhms: [42, 44, 71],
        measuredAt: at(6, 14),
        notes:
          "After rebuild: contacts dressed, springs replaced. Pole 3 high — re-check the moving contact alignment.",
      },
      {
        ...contact,
        componentId: c.get("G2")!.id,
        poleMicroOhms: [47, 45, 49],
        measuredAt: at(7, 14),
        notes: "After rebuild.",
      },
      {
        ...contact,
        componentId: c.get("1-4")!.id,
        poleMicroOhms: [118, 124, 121],
        measuredAt: at(7, 15),
        notes: "Rebuilt on the bench.",
      },
    ])
    .execute();

  await db
    .insertInto("thermalScans")
    .values([
      {
        siteId,
        boardId: board.id,
        componentId: c.get("1-6")!.id,
        componentTempC: 41.5,
        similarTempC: 35,
        ambientTempC: 27,
        loadPercent: 65,
        measuredAt: at(12, 11),
        instrument: "Thermal camera TC-3 (fictional)",
        notes: "Load-side lug, phase B, after two hours on the temporary feed.",
        recordedBy: volunteer,
      },
      {
        siteId,
        boardId: board.id,
        componentId: c.get("1-5")!.id,
        componentTempC: 35.5,
        similarTempC: 35,
        ambientTempC: 27,
        loadPercent: 60,
        measuredAt: at(12, 11, 5),
        instrument: "Thermal camera TC-3 (fictional)",
        notes: "",
        recordedBy: volunteer,
      },
    ])
    .execute();

  const check = { siteId, boardId: board.id, lineVolts: 450, instrument: "", recordedBy: curator };
  await db
    .insertInto("groundLampChecks")
    .values([
      {
        ...check,
        energisation: "Bus section A from the temporary fused feed",
        lampA: "bright",
        lampB: "bright",
        lampC: "bright",
        measuredAt: at(11, 9),
        notes: "All three alike.",
      },
      {
        ...check,
        energisation: "Bus section B added through the bus tie",
        lampA: "bright",
        lampB: "dim",
        lampC: "bright",
        measuredAt: at(12, 9, 40),
        notes: "Phase B lamp dim after closing the tie; feeders of section B left open.",
      },
    ])
    .execute();
}
