/**
 * The invented boards of MV Kestrel Lantern (fictional): where every position sits on
 * each board's face and what nameplate its component carries. All makers, models and
 * serials are made up; nothing here names a real manufacturer.
 */
import type { ComponentKind, Heritage } from "../../src/domain/vocab";

export interface SeedPosition {
  designation: string;
  kind: ComponentKind;
  row: number;
  col: number;
  rowSpan?: number;
  colSpan?: number;
  circuit: string;
  section: string;
}

export interface SeedBoard {
  name: string;
  location: string;
  nominalVolts: number;
  yearBuilt: number;
  drawingRef: string;
  faceHeightMm: number;
  /** null: the water never reached this board's face. */
  waterLineMm: number | null;
  gridRows: number;
  gridCols: number;
  notes: string;
  sections: string[];
  positions: SeedPosition[];
}

/** Deterministic pseudo-random numbers (mulberry32), so the demo is the same on every load. */
export function seededRandom(seed: number) {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return {
    next,
    pick: <T>(xs: readonly T[]): T => xs[Math.floor(next() * xs.length)],
    chance: (p: number) => next() < p,
    between: (lo: number, hi: number) => lo + next() * (hi - lo),
  };
}

const MAIN_SECTIONS = [
  "Instruments and control",
  "Generators and bus tie",
  "Power distribution",
  "Lighting distribution",
];
const POWER_FEEDS = [
  "Main circulating pump",
  "Fire pump",
  "Bilge pump No. 1",
  "Bilge pump No. 2",
  "Steering gear",
  "Windlass",
  "Fuel transfer pump",
  "Lube oil pump",
  "Engine-room fan supply",
  "Engine-room fan exhaust",
  "Air compressor",
  "Capstan",
  "Galley range",
  "Workshop lathe",
  "Sanitary pump",
  "Fresh-water pump",
  "Refrigeration",
  "Cargo winch",
  "Boat winch",
  "Spare",
];
const LIGHT_FEEDS = [
  "Engine-room lighting",
  "Accommodation lighting fwd",
  "Accommodation lighting aft",
  "Navigation lights",
  "Deck floodlights",
  "Wheelhouse",
  "Chart room",
  "Mess room",
  "Galley lighting",
  "Steering flat lighting",
  "Shaft tunnel lighting",
  "Searchlight",
  "Radio room",
  "Emergency lantern charger",
  "Spare",
];

function mainBoard(): SeedPosition[] {
  const p: SeedPosition[] = [];
  const top = (designation: string, kind: ComponentKind, col: number, circuit: string, colSpan = 1) =>
    p.push({ designation, kind, row: 1, col, colSpan, circuit, section: MAIN_SECTIONS[0] });
  ["Voltmeter, generator 1", "Ammeter, generator 1", "Kilowatt meter, generator 1", "Frequency meter"].forEach((c, i) =>
    top(`M-${i + 1}`, "meter", i + 1, c),
  );
  ["A", "B", "C"].forEach((ph, i) => top(`GL-${ph}`, "ground_lamp", 5 + i, `Ground-detection lamp, phase ${ph}`));
  [
    "Voltmeter, generator 2",
    "Ammeter, generator 2",
    "Kilowatt meter, generator 2",
    "Synchroscope",
    "Bus voltmeter",
  ].forEach((c, i) => top(`M-${i + 5}`, "meter", 8 + i, c));
  const r2 = (designation: string, kind: ComponentKind, col: number, circuit: string, colSpan = 1) =>
    p.push({ designation, kind, row: 2, col, colSpan, circuit, section: MAIN_SECTIONS[0] });
  r2("S-1", "switch", 1, "Voltmeter selector switch");
  r2("S-2", "switch", 2, "Ammeter selector switch");
  r2("R-1", "relay", 3, "Reverse-power relay, generator 1");
  r2("R-2", "relay", 4, "Reverse-power relay, generator 2");
  r2("S-3", "switch", 5, "Ground-lamp test switch");
  r2("T-1", "transformer", 6, "Potential transformer, instruments", 2);
  for (let i = 1; i <= 5; i++) r2(`F-${i}`, "fuse", 7 + i, `Control fuse ${i}, instrument circuits`);
  const big = (designation: string, kind: ComponentKind, col: number, colSpan: number, circuit: string) =>
    p.push({ designation, kind, row: 3, col, rowSpan: 2, colSpan, circuit, section: MAIN_SECTIONS[1] });
  big("G1", "power_breaker", 1, 3, "Generator 1 main breaker");
  big("BUS-A", "busbar", 4, 1, "Bus section A");
  big("BT-1", "bus_tie", 5, 2, "Bus tie, section A to B");
  big("BUS-B", "busbar", 7, 1, "Bus section B");
  big("G2", "power_breaker", 8, 3, "Generator 2 main breaker");
  big("SH-1", "power_breaker", 11, 2, "Shore connection breaker");
  for (let r = 5; r <= 10; r++) {
    const lighting = r >= 8;
    const feeds = lighting ? LIGHT_FEEDS : POWER_FEEDS;
    const last = r === 10 ? 10 : 12;
    for (let c = 1; c <= last; c++) {
      const n = (r - 5) * 12 + c;
      const kind: ComponentKind =
        r === 9 && c >= 11
          ? "switch"
          : (r === 7 && c === 12) || (r === 10 && c === 10)
            ? "fuse"
            : "molded_case_breaker";
      p.push({
        designation: `${r - 4}-${c}`,
        kind,
        row: r,
        col: c,
        circuit: feeds[n % feeds.length],
        section: MAIN_SECTIONS[lighting ? 3 : 2],
      });
    }
  }
  p.push({
    designation: "TB-1",
    kind: "terminal_strip",
    row: 10,
    col: 11,
    colSpan: 2,
    circuit: "Outgoing cable terminals",
    section: MAIN_SECTIONS[3],
  });
  return p;
}

const EMERGENCY_SECTIONS = ["Emergency generator panel", "Emergency distribution"];
const EMERGENCY_FEEDS = [
  "Emergency lighting, engine room",
  "Emergency lighting, alleyways",
  "Navigation lights (standby)",
  "Steering gear (standby)",
  "Fire pump (emergency)",
  "Radio",
  "General alarm",
  "Fire detection panel",
  "Whistle",
  "Emergency bilge pump",
  "Battery charger",
  "Spare",
];

function emergencyBoard(): SeedPosition[] {
  const p: SeedPosition[] = [];
  const s0 = EMERGENCY_SECTIONS[0];
  p.push({
    designation: "EM-1",
    kind: "meter",
    row: 1,
    col: 1,
    circuit: "Voltmeter, emergency generator",
    section: s0,
  });
  p.push({ designation: "EM-2", kind: "meter", row: 1, col: 2, circuit: "Ammeter, emergency generator", section: s0 });
  ["A", "B", "C"].forEach((ph, i) =>
    p.push({
      designation: `EGL-${ph}`,
      kind: "ground_lamp",
      row: 1,
      col: 3 + i,
      circuit: `Ground-detection lamp, phase ${ph}`,
      section: s0,
    }),
  );
  p.push({ designation: "EM-3", kind: "meter", row: 1, col: 6, circuit: "Frequency meter, emergency", section: s0 });
  p.push({
    designation: "EG",
    kind: "power_breaker",
    row: 2,
    col: 1,
    colSpan: 2,
    circuit: "Emergency generator breaker",
    section: s0,
  });
  p.push({
    designation: "ET-1",
    kind: "bus_tie",
    row: 2,
    col: 3,
    colSpan: 2,
    circuit: "Tie feeder from main switchboard",
    section: s0,
  });
  p.push({
    designation: "ET-X",
    kind: "transformer",
    row: 2,
    col: 5,
    colSpan: 2,
    circuit: "Lighting transformer 450/115 V",
    section: s0,
  });
  for (let r = 3; r <= 5; r++)
    for (let c = 1; c <= 6; c++)
      p.push({
        designation: `E${r - 2}-${c}`,
        kind: "molded_case_breaker",
        row: r,
        col: c,
        circuit: EMERGENCY_FEEDS[((r - 3) * 6 + c) % EMERGENCY_FEEDS.length],
        section: EMERGENCY_SECTIONS[1],
      });
  for (let i = 1; i <= 4; i++)
    p.push({
      designation: `EF-${i}`,
      kind: "fuse",
      row: 6,
      col: i,
      circuit: `Control fuse ${i}`,
      section: EMERGENCY_SECTIONS[1],
    });
  p.push({
    designation: "ER-1",
    kind: "relay",
    row: 6,
    col: 5,
    circuit: "Undervoltage relay, emergency changeover",
    section: EMERGENCY_SECTIONS[1],
  });
  p.push({
    designation: "ES-1",
    kind: "switch",
    row: 6,
    col: 6,
    circuit: "Changeover switch, main / emergency",
    section: EMERGENCY_SECTIONS[1],
  });
  return p;
}

export const SEED_BOARDS: SeedBoard[] = [
  {
    name: "Main switchboard (engine room, aft)",
    location: "Engine room, aft bulkhead, starboard side",
    nominalVolts: 450,
    yearBuilt: 1946,
    drawingRef: "KL-E-101 rev C (fictional yard drawing)",
    faceHeightMm: 2100,
    waterLineMm: 1100,
    gridRows: 10,
    gridCols: 12,
    notes:
      "Dead-front, 450 V three-phase 60 Hz, ungrounded with three ground-detection lamps. Harbour water reached 1.1 m on the face.",
    sections: MAIN_SECTIONS,
    positions: mainBoard(),
  },
  {
    name: "Emergency board (boat deck)",
    location: "Emergency generator room, boat deck",
    nominalVolts: 450,
    yearBuilt: 1947,
    drawingRef: "KL-E-140 (fictional)",
    faceHeightMm: 1500,
    waterLineMm: null,
    gridRows: 6,
    gridCols: 6,
    notes: "Above the flood, but salt spray came in through the storm-damaged skylight.",
    sections: EMERGENCY_SECTIONS,
    positions: emergencyBoard(),
  },
];

export interface Nameplate {
  maker: string;
  model: string;
  frame: string;
  ratingAmps: number | null;
  poles: number | null;
  voltageRating: number | null;
  interruptingKa: number | null;
  year: number | null;
  meterRange: string;
  lampWatts: number | null;
}

const MAKERS: Record<Heritage, string[]> = {
  original: ["Harlow & Breen Electric", "Northgate Switchgear Co."],
  period: ["Ostrander Electric Mfg.", "Whitcombe Apparatus Co."],
  modern: ["Vantor Controls", "Kellsey Power Products"],
};
const YEARS: Record<Heritage, [number, number]> = {
  original: [1944, 1947],
  period: [1951, 1962],
  modern: [2003, 2019],
};

/** A meter's scale from what it measures, as its circuit names it ("Ammeter, generator 2" → amperes). */
function meterRangeFor(circuit: string, drawn: string): string {
  if (/frequency/i.test(circuit)) return "55–65 Hz";
  if (/kilowatt/i.test(circuit)) return "0–1000 kW";
  if (/ammeter/i.test(circuit)) return /emergency/i.test(circuit) ? "0–400 A" : "0–1500 A";
  if (/voltmeter/i.test(circuit)) return "0–600 V";
  return drawn;
}

/** An invented nameplate for a component of this kind and heritage (a meter's scale follows its circuit). */
export function nameplateFor(
  kind: ComponentKind,
  heritage: Heritage,
  rnd: ReturnType<typeof seededRandom>,
  circuit = "",
): Nameplate {
  const maker = rnd.pick(MAKERS[heritage]);
  const [y0, y1] = YEARS[heritage];
  const year = Math.round(rnd.between(y0, y1));
  const base: Nameplate = {
    maker,
    model: "",
    frame: "",
    ratingAmps: null,
    poles: null,
    voltageRating: null,
    interruptingKa: null,
    year,
    meterRange: "",
    lampWatts: null,
  };
  switch (kind) {
    case "molded_case_breaker": {
      const amps = rnd.pick([15, 20, 30, 40, 50, 70, 100]);
      return {
        ...base,
        model: heritage === "modern" ? "VX-125" : rnd.pick(["Type QF", "Type QFL"]),
        frame: amps > 50 ? "100 A frame" : "50 A frame",
        ratingAmps: amps,
        poles: 3,
        voltageRating: 500,
        interruptingKa: rnd.pick([5, 10, 15]),
      };
    }
    case "power_breaker":
      return {
        ...base,
        model: "Type NA air circuit breaker",
        frame: "1600 A frame",
        ratingAmps: rnd.pick([600, 800, 1200]),
        poles: 3,
        voltageRating: 600,
        interruptingKa: 25,
      };
    case "bus_tie":
      return {
        ...base,
        model: "Type NA tie breaker",
        frame: "1600 A frame",
        ratingAmps: 1200,
        poles: 3,
        voltageRating: 600,
        interruptingKa: 25,
      };
    case "busbar":
      return { ...base, model: "Copper bus, 2 × 50 × 6 mm per phase", ratingAmps: 1600, poles: 3, voltageRating: 600 };
    case "meter":
      return {
        ...base,
        maker: heritage === "original" ? "Calloway Instrument Works" : maker,
        model: "Switchboard pattern, 6 in. dial",
        // Drawn as before (the demo's later random values stay as they were), then set by what the meter measures.
        meterRange: meterRangeFor(circuit, rnd.pick(["0–600 V", "0–1500 A", "0–1000 kW", "55–65 Hz"])),
      };
    case "ground_lamp":
      return {
        ...base,
        maker: heritage === "original" ? "Pennard Fuse & Lamp Co." : maker,
        model: "Lampholder with red lens",
        lampWatts: 25,
        voltageRating: 250,
      };
    case "fuse":
      return {
        ...base,
        maker: heritage === "original" ? "Pennard Fuse & Lamp Co." : maker,
        model: "Cartridge fuse holder",
        ratingAmps: rnd.pick([2, 5, 10, 15]),
        poles: 1,
        voltageRating: 600,
      };
    case "transformer":
      return { ...base, model: "Dry-type, air-cooled", ratingAmps: 10, voltageRating: 450, meterRange: "450/115 V" };
    case "relay":
      return { ...base, model: "Induction-disc relay", voltageRating: 115 };
    case "switch":
      return { ...base, model: "Rotary cam switch", ratingAmps: 30, poles: 3, voltageRating: 500 };
    default:
      return { ...base, model: "Porcelain terminal board, 24 ways", voltageRating: 600 };
  }
}
