import { correctInsulation, judgeGroundCheck, judgeThermalScan } from "../../src/domain/reading-judgement";
import type { z } from "zod";
import type {
  contactReadingBody,
  criteriaBody,
  groundCheckBody,
  insulationReadingBody,
  overrideBody,
  thermalScanBody,
} from "../../src/schemas/readings";
import { recordAudit } from "../audit";
import type { Db } from "../db";
import { AppError, conflict, notFound } from "../errors";
import { onReadingRecorded } from "../return-to-service/hooks";
import { isUniqueViolation } from "../middleware/pg-errors";
import { huntStepDto, judgeTrip } from "./judge";
import { TRIP_TESTABLE_KINDS } from "../../src/domain/trip-test";
import type { groundHuntBody, stepVoltageBody, tripTestBody } from "../../src/schemas/readings";
import * as repo from "./repository";
import {
  boardOrThrow,
  componentOrThrow,
  listContacts,
  listGroundChecks,
  listInsulation,
  listStepTests,
  listThermal,
  listTripTests,
  loadCriteria,
  overrideDto,
} from "./reads";

const invalid = (field: string, message: string) => new AppError(400, "invalid_input", message, { [field]: message });

export async function saveCriteria(db: Db, siteId: string, userId: string, body: z.infer<typeof criteriaBody>) {
  return db
    .transaction()
    .execute(async (trx) => {
      const before = await loadCriteria(trx, siteId);
      if (body.version !== before.version)
        throw conflict("Someone changed the criteria since you opened them. Here they are now.", before);
      const { version, ...patch } = body;
      const saved =
        before.version === 0
          ? await repo.insertCriteria(trx, { siteId, updatedBy: userId, ...patch })
          : await repo.updateCriteria(trx, siteId, version, { ...patch, updatedBy: userId });
      if (!saved)
        throw conflict(
          "Someone changed the criteria since you opened them. Here they are now.",
          await loadCriteria(trx, siteId),
        );
      await recordAudit(trx, {
        siteId,
        entityType: "reading_criteria",
        entityId: siteId,
        action: "update",
        actorId: userId,
        before,
        after: patch,
      });
      return loadCriteria(trx, siteId);
    })
    .catch(async (e) => {
      // Two first saves at once: the second INSERT meets the first's row (23505) → 409 with the saved criteria.
      if (isUniqueViolation(e))
        throw conflict(
          "Someone saved the criteria at the same moment. Here they are now.",
          await loadCriteria(db, siteId),
        );
      throw e;
    });
}

export async function saveOverride(
  db: Db,
  siteId: string,
  componentId: string,
  userId: string,
  body: z.infer<typeof overrideBody>,
) {
  return db
    .transaction()
    .execute(async (trx) => {
      const component = await repo.findComponent(trx, siteId, componentId);
      if (!component) throw notFound("That component");
      const existing = await repo.getOverride(trx, siteId, componentId);
      const values = {
        minimumMegohms: body.minimumMegohms,
        maximumMicroOhms: body.maximumMicroOhms,
        source: body.source,
        updatedBy: userId,
      };
      let saved;
      if (!existing) saved = await repo.insertOverride(trx, { siteId, componentId, ...values });
      else {
        if (body.version !== existing.version)
          throw conflict("Someone changed this manufacturer's value since you opened it.", overrideDto(existing));
        saved = await repo.updateOverride(trx, existing.id, existing.version, values);
        if (!saved)
          throw conflict(
            "Someone changed this manufacturer's value since you opened it.",
            overrideDto((await repo.getOverride(trx, siteId, componentId))!),
          );
      }
      await recordAudit(trx, {
        siteId,
        entityType: "component_reading_override",
        entityId: componentId,
        action: existing ? "update" : "create",
        actorId: userId,
        boardId: component.boardId,
        positionId: component.positionId,
        before: existing ?? null,
        after: values,
      });
      return overrideDto(saved);
    })
    .catch(async (e) => {
      if (!isUniqueViolation(e)) throw e;
      const now = await repo.getOverride(db, siteId, componentId);
      throw conflict(
        "Someone saved a manufacturer's value for this component at the same moment.",
        now ? overrideDto(now) : undefined,
      );
    });
}

export async function removeOverride(db: Db, siteId: string, componentId: string, userId: string) {
  await db.transaction().execute(async (trx) => {
    const existing = await repo.getOverride(trx, siteId, componentId);
    if (!existing) throw notFound("That manufacturer's value");
    await repo.deleteOverride(trx, siteId, componentId);
    await recordAudit(trx, {
      siteId,
      entityType: "component_reading_override",
      entityId: componentId,
      action: "delete",
      actorId: userId,
      before: existing,
    });
  });
}

/** A reading from the future is a typing slip (one hour's slack for clocks). */
function checkWhen(measuredAt: string, now = Date.now()) {
  if (new Date(measuredAt).getTime() > now + 3600_000)
    throw invalid("measuredAt", "The reading's time is in the future.");
}

export async function recordInsulation(
  db: Db,
  siteId: string,
  boardId: string,
  userId: string,
  b: z.infer<typeof insulationReadingBody>,
) {
  checkWhen(b.measuredAt);
  const criteria = await loadCriteria(db, siteId);
  try {
    correctInsulation(b.megohms, b.equipmentTempC, criteria);
  } catch (e) {
    if (e instanceof RangeError) {
      const range =
        criteria.correctionMethod === "ieee43_40c"
          ? "−10 to 100 °C for the IEEE 43 correction"
          : "−10 to 110 °C for the NETA correction table";
      throw invalid("equipmentTempC", `Equipment temperature must be within ${range}.`);
    }
    throw e;
  }
  const id = await db.transaction().execute(async (trx) => {
    await boardOrThrow(trx, siteId, boardId);
    let positionId: string | null = null;
    if (b.componentId) {
      const c = await componentOrThrow(trx, siteId, b.componentId);
      if (c.boardId !== boardId) throw invalid("componentId", "That component is not on this board.");
      positionId = c.positionId;
    }
    const row = {
      siteId,
      boardId,
      componentId: b.componentId,
      circuit: b.circuit,
      testVoltsDc: b.testVoltsDc,
      megohms: b.megohms,
      conductors: b.conductors,
      equipmentTempC: b.equipmentTempC,
      ambientTempC: b.ambientTempC,
      humidityPercent: b.humidityPercent,
      durationS: b.durationS,
      r30sMegohms: b.r30s,
      r1minMegohms: b.r1min,
      r10minMegohms: b.r10min,
      megohmsQualifier: b.megohmsQualifier,
      r30sQualifier: b.r30sQualifier,
      r1minQualifier: b.r1minQualifier,
      r10minQualifier: b.r10minQualifier,
      instrument: b.instrument,
      notes: b.notes,
      measuredAt: b.measuredAt,
      recordedBy: userId,
    };
    const { id } = await repo.insertInsulation(trx, row);
    await recordAudit(trx, {
      siteId,
      entityType: "insulation_reading",
      entityId: id,
      action: "record",
      actorId: userId,
      boardId,
      positionId,
      after: row,
    });
    const [judged] = await listInsulation(trx, siteId, { id });
    await onReadingRecorded(trx, siteId, userId, {
      kind: "insulation_reading",
      id,
      boardId,
      componentId: b.componentId,
      measuredAt: new Date(b.measuredAt),
      verdict: judged.judgement.verdict,
      words: judged.judgement.reasons.join(" "),
    });
    return id;
  });
  return (await listInsulation(db, siteId, { id }))[0];
}

export async function recordContact(
  db: Db,
  siteId: string,
  componentId: string,
  userId: string,
  b: z.infer<typeof contactReadingBody>,
) {
  checkWhen(b.measuredAt);
  const id = await db.transaction().execute(async (trx) => {
    const c = await componentOrThrow(trx, siteId, componentId);
    const row = {
      siteId,
      boardId: c.boardId,
      componentId,
      poleMicroOhms: b.poleMicroOhms,
      testCurrentA: b.testCurrentA,
      instrument: b.instrument,
      notes: b.notes,
      measuredAt: b.measuredAt,
      recordedBy: userId,
    };
    const { id } = await repo.insertContact(trx, row);
    await recordAudit(trx, {
      siteId,
      entityType: "contact_reading",
      entityId: id,
      action: "record",
      actorId: userId,
      boardId: c.boardId,
      positionId: c.positionId,
      after: row,
    });
    return id;
  });
  return (await listContacts(db, siteId, { id }))[0];
}

export async function recordThermal(
  db: Db,
  siteId: string,
  componentId: string,
  userId: string,
  b: z.infer<typeof thermalScanBody>,
) {
  checkWhen(b.measuredAt);
  const id = await db.transaction().execute(async (trx) => {
    const c = await componentOrThrow(trx, siteId, componentId);
    if (b.photoId) {
      const photo = await repo.photoOnSite(trx, siteId, b.photoId);
      if (!photo) throw invalid("photoId", "That photo is not on this site.");
      if (photo.kind !== "thermal") throw invalid("photoId", "That photo is not filed as a thermal image.");
    }
    const row = {
      siteId,
      boardId: c.boardId,
      componentId,
      componentTempC: b.componentTempC,
      similarTempC: b.similarTempC,
      ambientTempC: b.ambientTempC,
      loadPercent: b.loadPercent,
      loadAmps: b.loadAmps,
      photoId: b.photoId,
      instrument: b.instrument,
      notes: b.notes,
      measuredAt: b.measuredAt,
      recordedBy: userId,
    };
    const { id } = await repo.insertThermal(trx, row);
    await recordAudit(trx, {
      siteId,
      entityType: "thermal_scan",
      entityId: id,
      action: "record",
      actorId: userId,
      boardId: c.boardId,
      positionId: c.positionId,
      after: row,
    });
    const j = judgeThermalScan(row);
    await onReadingRecorded(trx, siteId, userId, {
      kind: "thermal_scan",
      id,
      boardId: c.boardId,
      componentId,
      measuredAt: new Date(b.measuredAt),
      level: j.level,
      words: j.source.text,
    });
    return id;
  });
  return (await listThermal(db, siteId, { id }))[0];
}

export async function recordGroundCheck(
  db: Db,
  siteId: string,
  boardId: string,
  userId: string,
  b: z.infer<typeof groundCheckBody>,
) {
  checkWhen(b.measuredAt);
  try {
    judgeGroundCheck({ lineVolts: b.lineVolts, lamps: b.lamps, volts: b.volts, branchOhms: b.branchOhms });
  } catch (e) {
    if (e instanceof RangeError) throw invalid("volts", `These lamp readings cannot be judged: ${e.message}.`);
    throw e;
  }
  const id = await db.transaction().execute(async (trx) => {
    await boardOrThrow(trx, siteId, boardId);
    const row = {
      siteId,
      boardId,
      energisation: b.energisation,
      lineVolts: b.lineVolts,
      lampA: b.lamps?.A ?? null,
      lampB: b.lamps?.B ?? null,
      lampC: b.lamps?.C ?? null,
      voltsA: b.volts?.A ?? null,
      voltsB: b.volts?.B ?? null,
      voltsC: b.volts?.C ?? null,
      branchOhms: b.branchOhms,
      capacitanceMicroF: b.capacitanceMicroF,
      instrument: b.instrument,
      notes: b.notes,
      measuredAt: b.measuredAt,
      recordedBy: userId,
    };
    const { id } = await repo.insertGroundCheck(trx, row);
    await recordAudit(trx, {
      siteId,
      entityType: "ground_lamp_check",
      entityId: id,
      action: "record",
      actorId: userId,
      boardId,
      after: row,
    });
    return id;
  });
  return (await listGroundChecks(db, siteId, { id }))[0];
}

export async function recordTripTest(
  db: Db,
  siteId: string,
  componentId: string,
  userId: string,
  b: z.infer<typeof tripTestBody>,
) {
  checkWhen(b.measuredAt);
  try {
    judgeTrip({ ...b });
  } catch (e) {
    if (e instanceof RangeError) throw invalid("test", `This trip test cannot be judged: ${e.message}.`);
    throw e;
  }
  const id = await db.transaction().execute(async (trx) => {
    const c = await componentOrThrow(trx, siteId, componentId);
    // The pages offer a trip test only on these kinds; the server refuses the rest the same way.
    if (!(TRIP_TESTABLE_KINDS as readonly string[]).includes(c.kind))
      throw invalid("componentId", "A trip test is recorded on a breaker, a bus tie or a trip unit, not on this part.");
    const { measuredAt, ...rest } = b;
    const row = { siteId, boardId: c.boardId, componentId, ...rest, measuredAt, recordedBy: userId };
    const { id } = await repo.insertTripTest(trx, row);
    await recordAudit(trx, {
      siteId,
      entityType: "trip_test",
      entityId: id,
      action: "record",
      actorId: userId,
      boardId: c.boardId,
      positionId: c.positionId,
      after: row,
    });
    return id;
  });
  return (await listTripTests(db, siteId, { id }))[0];
}

export async function recordStepTest(
  db: Db,
  siteId: string,
  boardId: string,
  userId: string,
  b: z.infer<typeof stepVoltageBody>,
) {
  checkWhen(b.measuredAt);
  const id = await db.transaction().execute(async (trx) => {
    await boardOrThrow(trx, siteId, boardId);
    let positionId: string | null = null;
    if (b.componentId) {
      const c = await componentOrThrow(trx, siteId, b.componentId);
      if (c.boardId !== boardId) throw invalid("componentId", "That component is not on this board.");
      positionId = c.positionId;
    }
    const row = {
      siteId,
      boardId,
      componentId: b.componentId,
      circuit: b.circuit,
      conductors: b.conductors,
      equipmentTempC: b.equipmentTempC,
      stepVolts: b.steps.map((s) => s.testVoltsDc),
      stepMegohms: b.steps.map((s) => s.megohms),
      instrument: b.instrument,
      notes: b.notes,
      measuredAt: b.measuredAt,
      recordedBy: userId,
    };
    const { id } = await repo.insertStepTest(trx, row);
    await recordAudit(trx, {
      siteId,
      entityType: "step_voltage_test",
      entityId: id,
      action: "record",
      actorId: userId,
      boardId,
      positionId,
      after: row,
    });
    return id;
  });
  return (await listStepTests(db, siteId, { id }))[0];
}

export async function recordHuntStep(
  db: Db,
  siteId: string,
  boardId: string,
  userId: string,
  b: z.infer<typeof groundHuntBody>,
) {
  checkWhen(b.measuredAt);
  const id = await db.transaction().execute(async (trx) => {
    await boardOrThrow(trx, siteId, boardId);
    if (b.positionId) {
      const p = await repo.findPosition(trx, siteId, b.positionId);
      if (!p || p.boardId !== boardId) throw invalid("positionId", "That position is not on this board.");
    }
    const row = {
      siteId,
      boardId,
      hunt: b.hunt,
      positionId: b.positionId,
      feeder: b.feeder,
      action: b.action,
      lampA: b.lamps.A,
      lampB: b.lamps.B,
      lampC: b.lamps.C,
      instrument: "",
      notes: b.notes,
      measuredAt: b.measuredAt,
      recordedBy: userId,
    };
    const { id } = await repo.insertHuntStep(trx, row);
    await recordAudit(trx, {
      siteId,
      entityType: "ground_hunt_step",
      entityId: id,
      action: "record",
      actorId: userId,
      boardId,
      positionId: b.positionId,
      after: row,
    });
    return id;
  });
  return (await repo.listHuntSteps(db, { siteId, id })).map(huntStepDto)[0];
}
