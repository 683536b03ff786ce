/**
 * Stored rows → response objects with their judgement, computed now from the site's
 * current criteria (so a change of criteria re-judges the history).
 */
import {
  insulationMinimum,
  judgeContactReading,
  judgeGroundCheck,
  judgeInsulationReading,
  judgeThermalScan,
  type ManufacturerValue,
  type ReadingCriteria,
} from "../../src/domain/reading-judgement";
import { minimumPolarizationIndex } from "../../src/domain/insulation";
import type { ContactReading, GroundCheck, InsulationReading, ThermalScan } from "../../src/schemas/readings";
import type * as repo from "./repository";

type Rows<F extends (...a: never[]) => Promise<unknown[]>> = Awaited<ReturnType<F>>[number];
export type Overrides = Map<string, ManufacturerValue>;

const iso = (d: Date | string) => (d instanceof Date ? d.toISOString() : new Date(d).toISOString());
const base = (r: { id: string; boardId: string; measuredAt: Date | string; instrument: string; notes: string; recordedByName: string | null }) => ({
  id: r.id,
  boardId: r.boardId,
  measuredAt: iso(r.measuredAt),
  instrument: r.instrument,
  notes: r.notes,
  recordedBy: r.recordedByName,
});

export function insulationDto(r: Rows<typeof repo.listInsulation>, c: ReadingCriteria, overrides: Overrides): InsulationReading {
  const maker = r.componentId ? overrides.get(r.componentId) : undefined;
  const ratedVolts = Number(r.voltageRating ?? r.nominalVolts);
  let judgement: InsulationReading["judgement"];
  try {
    judgement = judgeInsulationReading(
      { megohms: r.megohms, equipmentTempC: r.equipmentTempC, testVoltsDc: r.testVoltsDc, ratedVolts, r30s: r.r30sMegohms, r1min: r.r1minMegohms, r10min: r.r10minMegohms },
      c,
      maker,
    );
  } catch (e) {
    if (!(e instanceof RangeError)) throw e;
    // A reading recorded under another method may fall outside this method's range.
    const minimum = insulationMinimum(ratedVolts, c, maker);
    const minimumPi = minimumPolarizationIndex(c.thermalClass);
    judgement = {
      correctedMegohms: null, baseTemperatureC: null, correction: null,
      minimum: { megohms: minimum.minMegohms, from: minimum.from, source: minimum.source },
      pi: null, dar: null, minimumPi,
      piSource: { table: "IEEE Std 43, recommended minimum polarization index", text: `Thermal class ${c.thermalClass}: PI at least ${minimumPi}` },
      verdict: "investigate",
      reasons: [`This reading cannot be corrected with the site's method: ${e.message}.`],
      notes: [],
    };
  }
  return {
    ...base(r),
    componentId: r.componentId,
    designation: r.designation ?? null,
    circuit: r.circuit,
    testVoltsDc: r.testVoltsDc,
    megohms: r.megohms,
    conductors: r.conductors,
    equipmentTempC: r.equipmentTempC,
    ambientTempC: r.ambientTempC,
    humidityPercent: r.humidityPercent,
    durationS: r.durationS,
    r30s: r.r30sMegohms,
    r1min: r.r1minMegohms,
    r10min: r.r10minMegohms,
    judgement,
  };
}

export function contactDto(r: Rows<typeof repo.listContacts>, c: ReadingCriteria, overrides: Overrides): ContactReading {
  return {
    ...base(r),
    componentId: r.componentId,
    designation: r.designation,
    poleMicroOhms: r.poleMicroOhms.map(Number),
    testCurrentA: r.testCurrentA,
    judgement: judgeContactReading(r.poleMicroOhms.map(Number), c, overrides.get(r.componentId)),
  };
}

export function thermalDto(r: Rows<typeof repo.listThermal>): ThermalScan {
  return {
    ...base(r),
    componentId: r.componentId,
    designation: r.designation,
    componentTempC: r.componentTempC,
    similarTempC: r.similarTempC,
    ambientTempC: r.ambientTempC,
    loadPercent: r.loadPercent,
    loadAmps: r.loadAmps,
    photoId: r.photoId,
    judgement: judgeThermalScan(r),
  };
}

export function groundDto(r: Rows<typeof repo.listGroundChecks>, siteKind: "vessel" | "building" | "plant"): GroundCheck {
  const lamps = r.lampA && r.lampB && r.lampC ? { A: r.lampA, B: r.lampB, C: r.lampC } : null;
  const volts = r.voltsA != null && r.voltsB != null && r.voltsC != null ? { A: r.voltsA, B: r.voltsB, C: r.voltsC } : null;
  return {
    ...base(r),
    componentId: null,
    designation: null,
    energisation: r.energisation,
    lineVolts: r.lineVolts,
    lamps,
    volts,
    branchOhms: r.branchOhms,
    judgement: judgeGroundCheck({ lineVolts: r.lineVolts, lamps, volts, branchOhms: r.branchOhms, siteKind }),
  };
}
