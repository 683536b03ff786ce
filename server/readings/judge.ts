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
import type {
  ContactReading,
  GroundCheck,
  GroundHuntStep,
  InsulationReading,
  StepVoltageTest,
  ThermalScan,
  TripTest,
} from "../../src/schemas/readings";
import { judgeInstantaneousTrip, judgeInverseTimeTrip } from "../../src/domain/trip-test";
import { judgeStepVoltage } from "../../src/domain/insulation-comparison";
import type * as repo from "./repository";

type Rows<F extends (...a: never[]) => Promise<unknown[]>> = Awaited<ReturnType<F>>[number];
export type Overrides = Map<string, ManufacturerValue>;

const iso = (d: Date | string) => (d instanceof Date ? d.toISOString() : new Date(d).toISOString());
const base = (r: {
  id: string;
  boardId: string;
  measuredAt: Date | string;
  instrument: string;
  notes: string;
  recordedByName: string | null;
}) => ({
  id: r.id,
  boardId: r.boardId,
  measuredAt: iso(r.measuredAt),
  instrument: r.instrument,
  notes: r.notes,
  recordedBy: r.recordedByName,
});

export function insulationDto(
  r: Rows<typeof repo.listInsulation>,
  c: ReadingCriteria,
  overrides: Overrides,
): InsulationReading {
  const maker = r.componentId ? overrides.get(r.componentId) : undefined;
  const ratedVolts = Number(r.voltageRating ?? r.nominalVolts);
  let judgement: InsulationReading["judgement"];
  try {
    judgement = judgeInsulationReading(
      {
        megohms: r.megohms,
        equipmentTempC: r.equipmentTempC,
        testVoltsDc: r.testVoltsDc,
        ratedVolts,
        r30s: r.r30sMegohms,
        r1min: r.r1minMegohms,
        r10min: r.r10minMegohms,
        megohmsQualifier: r.megohmsQualifier,
        r30sQualifier: r.r30sQualifier,
        r1minQualifier: r.r1minQualifier,
        r10minQualifier: r.r10minQualifier,
        ambientTempC: r.ambientTempC,
        humidityPercent: r.humidityPercent,
      },
      c,
      maker,
    );
  } catch (e) {
    if (!(e instanceof RangeError)) throw e;
    // A reading recorded under another method may fall outside this method's range.
    const minimum = insulationMinimum(ratedVolts, c, maker);
    const minimumPi = minimumPolarizationIndex(c.thermalClass);
    judgement = {
      correctedMegohms: null,
      qualifier: r.megohmsQualifier,
      baseTemperatureC: null,
      correction: null,
      minimum: { megohms: minimum.minMegohms, from: minimum.from, source: minimum.source },
      pi: null,
      piBound: null,
      dar: null,
      darBound: null,
      piNotRequired: false,
      minimumPi,
      piSource: {
        table: "IEEE Std 43, recommended minimum polarization index",
        text: `Thermal class ${c.thermalClass}: PI at least ${minimumPi}`,
      },
      validForJudging: true,
      dewPointC: null,
      validitySource: { table: "Dew point", text: "Not checked" },
      suggestedTestVoltsDc: minimum.recommendedTestVoltsDc,
      testVoltageOver: false,
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
    megohmsQualifier: r.megohmsQualifier,
    r30sQualifier: r.r30sQualifier,
    r1minQualifier: r.r1minQualifier,
    r10minQualifier: r.r10minQualifier,
    judgement,
  };
}

export function contactDto(
  r: Rows<typeof repo.listContacts>,
  c: ReadingCriteria,
  overrides: Overrides,
): ContactReading {
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

export function groundDto(
  r: Rows<typeof repo.listGroundChecks>,
  siteKind: "vessel" | "building" | "plant",
): GroundCheck {
  const lamps = r.lampA && r.lampB && r.lampC ? { A: r.lampA, B: r.lampB, C: r.lampC } : null;
  const volts =
    r.voltsA != null && r.voltsB != null && r.voltsC != null ? { A: r.voltsA, B: r.voltsB, C: r.voltsC } : null;
  return {
    ...base(r),
    componentId: null,
    designation: null,
    energisation: r.energisation,
    lineVolts: r.lineVolts,
    lamps,
    volts,
    branchOhms: r.branchOhms,
    capacitanceMicroF: r.capacitanceMicroF,
    judgement: judgeGroundCheck({
      lineVolts: r.lineVolts,
      lamps,
      volts,
      branchOhms: r.branchOhms,
      capacitanceMicroF: r.capacitanceMicroF,
      frequencyHz: Number(r.frequencyHz ?? 60),
      siteKind,
    }),
  };
}

export function tripDto(r: Rows<typeof repo.listTripTests>): TripTest {
  const row = {
    test: r.test,
    tripUnit: r.tripUnit,
    adjustable: r.adjustable,
    pole: r.pole,
    ratingAmps: r.ratingAmps,
    systemVolts: r.systemVolts,
    testAmps: r.testAmps,
    tripSeconds: r.tripSeconds,
    bandMinSeconds: r.bandMinSeconds,
    bandMaxSeconds: r.bandMaxSeconds,
    settingAmps: r.settingAmps,
    publishedLowAmps: r.publishedLowAmps,
    publishedHighAmps: r.publishedHighAmps,
    pickupAmps: r.pickupAmps,
  };
  return { ...base(r), componentId: r.componentId, designation: r.designation, ...row, judgement: judgeTrip(row) };
}

type TripRow = Pick<
  TripTest,
  | "test"
  | "tripUnit"
  | "adjustable"
  | "ratingAmps"
  | "systemVolts"
  | "testAmps"
  | "tripSeconds"
  | "bandMinSeconds"
  | "bandMaxSeconds"
  | "settingAmps"
  | "publishedLowAmps"
  | "publishedHighAmps"
  | "pickupAmps"
>;

/** Verdict of one trip test (src/domain/trip-test.ts); the window in words for the table. */
export function judgeTrip(r: TripRow): TripTest["judgement"] {
  if (r.test === "inverse_time") {
    const manufacturer =
      r.bandMinSeconds != null && r.bandMaxSeconds != null
        ? { minSeconds: r.bandMinSeconds, maxSeconds: r.bandMaxSeconds }
        : null;
    const j = judgeInverseTimeTrip({
      ratingAmps: r.ratingAmps,
      testAmps: r.testAmps!,
      tripSeconds: r.tripSeconds,
      systemVolts: r.systemVolts,
      tripUnit: r.tripUnit,
      manufacturer,
    });
    return {
      verdict: j.verdict,
      reasons: j.reasons,
      window: j.band ? `${j.band.minSeconds}–${j.band.maxSeconds} s at ${Math.round(j.percentOfRating)} %` : "no band",
      source: {
        table: j.band?.source.startsWith("NETA")
          ? "NETA ATS Table 100.7 (from memory)"
          : "Manufacturer's time-current curve",
        text: j.band?.source ?? "Record the manufacturer's band",
      },
    };
  }
  const j = judgeInstantaneousTrip({
    tripUnit: r.tripUnit,
    adjustable: r.adjustable,
    pickupAmps: r.pickupAmps!,
    settingAmps: r.settingAmps,
    published:
      r.publishedLowAmps != null && r.publishedHighAmps != null
        ? { lowAmps: r.publishedLowAmps, highAmps: r.publishedHighAmps }
        : null,
  });
  return {
    verdict: j.verdict,
    reasons: j.reasons,
    window: `${Math.round(j.lowAmps)}–${Math.round(j.highAmps)} A`,
    source: { table: "NETA ATS Table 100.8 (from memory)", text: j.source },
  };
}

export function stepDto(r: Rows<typeof repo.listStepTests>): StepVoltageTest {
  const steps = r.stepVolts.map((v, i) => ({ testVoltsDc: Number(v), megohms: Number(r.stepMegohms[i]) }));
  const j = judgeStepVoltage(steps);
  return {
    ...base(r),
    componentId: r.componentId,
    designation: r.designation ?? null,
    circuit: r.circuit,
    conductors: r.conductors,
    equipmentTempC: r.equipmentTempC,
    steps: j.steps,
    judgement: {
      largestFall: j.largestFall,
      verdict: j.verdict,
      reasons: j.reasons,
      source: {
        table: "Step-voltage test (common practice)",
        text: "Investigate a fall of more than about 25 % as the test voltage rises",
      },
    },
  };
}

export function huntStepDto(r: Rows<typeof repo.listHuntSteps>): GroundHuntStep {
  return {
    ...base(r),
    componentId: null,
    designation: null,
    hunt: r.hunt,
    positionId: r.positionId,
    feeder: r.feeder,
    action: r.action,
    lamps: { A: r.lampA, B: r.lampB, C: r.lampC },
  };
}
