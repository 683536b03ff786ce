/**
 * The two-way link between defects and readings: the reading a defect was raised
 * from, and the re-test readings that prove its repair; plus what closing needs (a re-test
 * meeting its criterion or an "after work" photo). Readings are judged by the readings
 * service at the moment they are read, so a change of criteria re-judges the evidence too.
 * This domain is the only writer of defect_readings.
 */
import type { Db } from "../db";
import { AppError, notFound } from "../errors";
import * as readings from "../readings/reads";
import { recordAudit } from "../audit";
import * as repo from "./repository";

export type ReadingKind = "insulation" | "contact" | "thermal" | "ground";
export type LinkRole = "raised_from" | "retest";

/** One reading of any kind, judged, in the few words a defect page shows. */
export async function judgedReading(db: Db, siteId: string, kind: ReadingKind, id: string) {
  if (kind === "insulation") {
    const r = (await readings.listInsulation(db, siteId, { id }))[0];
    return (
      r && {
        componentId: r.componentId,
        boardId: r.boardId,
        measuredAt: r.measuredAt,
        verdict: r.judgement.verdict,
        summary: `Insulation ${r.megohms} MΩ at ${r.testVoltsDc} V DC (${r.conductors})`,
      }
    );
  }
  if (kind === "contact") {
    const r = (await readings.listContacts(db, siteId, { id }))[0];
    return (
      r && {
        componentId: r.componentId,
        boardId: r.boardId,
        measuredAt: r.measuredAt,
        verdict: r.judgement.verdict,
        summary: `Contact resistance ${r.poleMicroOhms.join(" / ")} µΩ`,
      }
    );
  }
  if (kind === "thermal") {
    const r = (await readings.listThermal(db, siteId, { id }))[0];
    return (
      r && {
        componentId: r.componentId,
        boardId: r.boardId,
        measuredAt: r.measuredAt,
        verdict: r.judgement.verdict,
        summary: `Thermal scan ${r.componentTempC} °C, level ${r.judgement.level}: ${r.judgement.action}`,
      }
    );
  }
  const r = (await readings.listGroundChecks(db, siteId, { id }))[0];
  return (
    r && {
      componentId: null,
      boardId: r.boardId,
      measuredAt: r.measuredAt,
      verdict: r.judgement.verdict,
      summary: `Ground lamps: ${r.judgement.words}`,
    }
  );
}

/** What the close needs, counted now. */
export async function repairEvidence(db: Db, siteId: string, defectId: string) {
  const links = (await repo.readingLinksOf(db, defectId)).filter((l) => l.role === "retest");
  const judged = await Promise.all(links.map((l) => judgedReading(db, siteId, l.readingKind, l.readingId)));
  const afterPhotos = await repo.afterWorkPhotoCount(db, siteId, defectId);
  return { retestsMeeting: judged.filter((j) => j?.verdict === "meets").length, afterPhotos };
}

/** The defect page's evidence panel: linked readings (judged), after photos, and the component's recent readings to link. */
export async function evidenceOf(db: Db, siteId: string, d: { id: string; componentId: string | null }) {
  const links = await repo.readingLinksOf(db, d.id);
  const linked = (
    await Promise.all(
      links.map(async (l) => ({
        ...l,
        linkedAt: new Date(l.linkedAt).toISOString(),
        reading: await judgedReading(db, siteId, l.readingKind, l.readingId),
      })),
    )
  )
    .filter((l) => l.reading)
    .map((l) => ({
      id: l.id,
      readingKind: l.readingKind,
      readingId: l.readingId,
      role: l.role,
      linkedAt: l.linkedAt,
      ...l.reading!,
      measuredAt: String(l.reading!.measuredAt),
    }));
  const taken = new Set(links.map((l) => `${l.readingKind}:${l.readingId}`));
  const candidates: Array<{
    readingKind: ReadingKind;
    readingId: string;
    measuredAt: string;
    verdict: string;
    summary: string;
  }> = [];
  if (d.componentId) {
    const [ins, con, th] = await Promise.all([
      readings.listInsulation(db, siteId, { componentId: d.componentId, limit: 10 }),
      readings.listContacts(db, siteId, { componentId: d.componentId, limit: 10 }),
      readings.listThermal(db, siteId, { componentId: d.componentId, limit: 10 }),
    ]);
    for (const r of ins)
      candidates.push({
        readingKind: "insulation",
        readingId: r.id,
        measuredAt: String(r.measuredAt),
        verdict: r.judgement.verdict,
        summary: `Insulation ${r.megohms} MΩ at ${r.testVoltsDc} V DC (${r.conductors})`, // as judgedReading says it
      });
    for (const r of con)
      candidates.push({
        readingKind: "contact",
        readingId: r.id,
        measuredAt: String(r.measuredAt),
        verdict: r.judgement.verdict,
        summary: `Contact ${r.poleMicroOhms.join(" / ")} µΩ`,
      });
    for (const r of th)
      candidates.push({
        readingKind: "thermal",
        readingId: r.id,
        measuredAt: String(r.measuredAt),
        verdict: r.judgement.verdict,
        summary: `Thermal ${r.componentTempC} °C, level ${r.judgement.level}`,
      });
  }
  const evidence = await repairEvidence(db, siteId, d.id);
  return {
    linked,
    candidates: candidates
      .filter((c) => !taken.has(`${c.readingKind}:${c.readingId}`))
      .sort((a, b) => b.measuredAt.localeCompare(a.measuredAt))
      .slice(0, 15),
    ...evidence,
  };
}

/** Links a reading to a defect (as its origin or as a re-test); the reading must be on the site and, when both name one, the same component. */
export async function linkReading(
  db: Db,
  siteId: string,
  actorId: string,
  d: { id: string; componentId: string | null; boardId: string; positionId: string | null },
  b: { readingKind: ReadingKind; readingId: string; role: LinkRole },
) {
  const r = await judgedReading(db, siteId, b.readingKind, b.readingId);
  if (!r) throw notFound("That reading");
  if (r.componentId && d.componentId && r.componentId !== d.componentId)
    throw new AppError(400, "invalid_input", "That reading is of another component.", {
      readingId: "Another component",
    });
  if (!r.componentId && r.boardId !== d.boardId)
    throw new AppError(400, "invalid_input", "That reading is of another board.", { readingId: "Another board" });
  const row = await repo.upsertReadingLink(db, {
    siteId,
    defectId: d.id,
    readingKind: b.readingKind,
    readingId: b.readingId,
    role: b.role,
    linkedBy: actorId,
  });
  await recordAudit(db, {
    siteId,
    entityType: "defect",
    entityId: d.id,
    action: "link_reading",
    actorId,
    boardId: d.boardId,
    positionId: d.positionId,
    after: { ...b, verdict: r.verdict },
  });
  return row;
}

/** For the readings screens: the defects each reading of a board raised or proves. */
export const defectsOfBoardReadings = repo.defectsOfBoardReadings;
