/**
 * Everything the condition survey report shows, read in a few set-based queries per
 * board (never one query per position), so a 500-position board loads in one pass.
 * Reads only: the report writes nothing except through the parts service's own
 * reconciliation, which every read of the wanted list runs.
 */
import type { Selectable } from "kysely";
import type { BoardsTable } from "../../db/types";
import type {
  ComponentKind,
  Custody,
  DefectSeverity,
  DefectStatus,
  Disposition,
  Heritage,
  PhotoKind,
} from "../../src/domain/vocab";
import type { Criteria, ContactReading, GroundCheck, InsulationReading, ThermalScan } from "../../src/schemas/readings";
import type { PartLine } from "../../src/schemas/parts";
import type { SurveyReportQuery } from "../../src/schemas/reports";
import { localDate } from "../../src/domain/local-time";
import type { Db } from "../db";
import { notFound } from "../errors";
import * as repo from "./repository";
import { allLines } from "../parts/service";
import * as readings from "../readings/reads";
import { boardView } from "../return-to-service/view";
import type { RtsBoardView } from "../../src/schemas/return-to-service";

export interface ReportPhoto {
  id: string;
  kind: PhotoKind;
  displayKey: string;
  caption: string;
  takenAt: Date;
}

export interface ReportPosition {
  id: string;
  designation: string;
  kind: ComponentKind;
  circuit: string;
  sectionId: string | null;
  gridRow: number;
  gridCol: number;
  rowSpan: number;
  colSpan: number;
  component: null | {
    id: string;
    kind: ComponentKind;
    maker: string;
    model: string;
    frame: string;
    mounting: string;
    ratingAmps: number | null;
    poles: number | null;
    voltageRating: number | null;
    interruptingKa: number | null;
    serial: string;
    year: number | null;
    meterRange: string;
    lampWatts: number | null;
    heritage: Heritage;
    tagNumber: string | null;
    custody: Custody;
    custodyLocation: string;
    disposition: Disposition | null;
    dispositionReason: string;
    dispositionRecommended: Disposition | null;
    dispositionOverridden: boolean;
    decidedByName: string | null;
    dispositionAt: Date | null;
    notes: string;
  };
  latest: null | {
    inspectedAt: Date;
    inspectorName: string | null;
    percentRusted: number | null;
    astmGrade: number | null;
    isoRi: string | null;
    belowWaterLine: boolean | null;
    contaminants: string[];
    mechanism: string | null;
    insulation: string | null;
    notes: string;
  };
  photos: ReportPhoto[];
  insulation: InsulationReading[];
  contacts: ContactReading[];
  thermal: ThermalScan[];
}

export interface ReportDefect {
  ref: number;
  title: string;
  designation: string | null;
  category: string;
  severity: DefectSeverity;
  status: DefectStatus;
  safetyCritical: boolean;
  blocksEnergisation: boolean;
  assigneeName: string | null;
  dueOn: string | null;
  priorityScore: number;
}

export interface ReportBoard {
  id: string;
  name: string;
  location: string;
  nominalVolts: number;
  phases: number;
  frequencyHz: number;
  earthing: string;
  yearBuilt: number | null;
  faceHeightMm: number | null;
  waterLineMm: number | null;
  gridRows: number;
  gridCols: number;
  drawingRef: string;
  sections: Array<{ id: string; name: string }>;
  positions: ReportPosition[];
  /** Insulation readings by series (a component or a circuit, and the conductors tested). */
  insulationSeries: Array<{ label: string; readings: InsulationReading[] }>;
  groundChecks: GroundCheck[];
  defects: ReportDefect[];
  /** The board's return-to-service record (server/return-to-service), when that section is asked for. */
  rts: RtsBoardView | null;
}

export interface ReportData {
  /** `timeZone`: the site's IANA zone, in which the report writes its days and times. */
  site: { id: string; name: string; kind: string; location: string; description: string; timeZone: string };
  boards: ReportBoard[];
  flood: null | {
    occurredOn: string;
    waterType: string;
    maxDepthM: number | null;
    hoursSubmerged: number | null;
    notes: string;
  };
  criteria: Criteria;
  surveyors: Array<{ name: string; inspections: number }>;
  inspectedFrom: Date | null;
  inspectedTo: Date | null;
  parts: PartLine[];
  generatedAt: Date;
  generatedBy: string;
  query: SurveyReportQuery;
}

/** Defect states in which nothing more is to be done; every other state is "open" in the report. */
export const FINISHED: DefectStatus[] = ["closed", "accepted_as_is"];
export const isOpenDefect = (s: DefectStatus) => !FINISHED.includes(s);

/** Photos the report shows per position: as found and after work, newest first, up to this many of each. */
export const PHOTOS_PER_KIND = 2;
const REPORT_PHOTO_KINDS: PhotoKind[] = ["as_found", "after_work"];
const ALL = 1_000_000;

/** Whether an observation falls within the report's days, counted on the site's calendar. */
const inRange = (d: Date | string, q: { from?: string; to?: string; zone: string }) => {
  const day = localDate(d, q.zone);
  return (!q.from || day >= q.from) && (!q.to || day <= q.to);
};

/** Loads the report's data for one board or the whole site. Throws 404 for a board not on the site. */
export async function loadSurveyData(
  db: Db,
  siteId: string,
  q: SurveyReportQuery,
  viewer: { id: string; name: string },
): Promise<ReportData> {
  const site = await repo.siteForReport(db, siteId);
  const boardRows = await repo.boardsForReport(db, siteId, q.boardId);
  if (q.boardId && boardRows.length === 0) throw notFound("That board");

  const [flood, criteria, parts] = await Promise.all([
    repo.latestFlood(db, siteId),
    readings.loadCriteria(db, siteId),
    q.sections && !q.sections.includes("parts") && !q.sections.includes("summary")
      ? Promise.resolve([] as PartLine[])
      : openParts(db, siteId, q.boardId),
  ]);

  const boards: ReportBoard[] = [];
  for (const b of boardRows) {
    const board = await loadBoard(db, siteId, b, q, site.timeZone);
    board.rts = !q.sections || q.sections.includes("rts") ? await boardView(db, siteId, b.id, new Date()) : null;
    boards.push(board);
  }

  const boardIds = boardRows.map((b) => b.id);
  const surveyRows = boardIds.length
    ? await repo.surveyorsOf(db, boardIds, { from: q.from, to: q.to, zone: site.timeZone })
    : [];
  const firsts = surveyRows.map((r) => new Date(r.first).getTime());
  const lasts = surveyRows.map((r) => new Date(r.last).getTime());

  return {
    site,
    boards,
    flood: flood
      ? {
          occurredOn: flood.occurredOn,
          waterType: flood.waterType,
          maxDepthM: flood.maxDepthM,
          hoursSubmerged: flood.hoursSubmerged,
          notes: flood.notes,
        }
      : null,
    criteria,
    surveyors: surveyRows.map((r) => ({ name: r.name, inspections: Number(r.n) })),
    inspectedFrom: firsts.length ? new Date(Math.min(...firsts)) : null,
    inspectedTo: lasts.length ? new Date(Math.max(...lasts)) : null,
    parts,
    generatedAt: new Date(),
    generatedBy: viewer.name,
    query: q,
  };
}

/** Every open line of the wanted list (of one board, or the site), through the parts service. */
async function openParts(db: Db, siteId: string, boardId?: string) {
  const out: PartLine[] = [];
  for await (const page of allLines(db, siteId, { status: "open", boardId })) out.push(...page);
  return out;
}

type BoardRow = Selectable<BoardsTable>;

async function loadBoard(
  db: Db,
  siteId: string,
  b: BoardRow,
  q: SurveyReportQuery,
  zone: string,
): Promise<ReportBoard> {
  const days = { from: q.from, to: q.to, zone };
  const [sections, positions, components, latest, photos, insulation, contacts, thermal, groundChecks, defects] =
    await Promise.all([
      repo.sectionsOfBoard(db, b.id),
      repo.positionsOfBoard(db, b.id),
      repo.componentsOfBoard(db, b.id),
      // The newest inspection of each position's component inside the date range (DISTINCT ON).
      repo.latestInspectionsOfBoard(db, b.id, days),
      q.photos === "yes" ? repo.reportPhotosOfBoard(db, b.id, REPORT_PHOTO_KINDS) : Promise.resolve([]),
      readings.listInsulation(db, siteId, { boardId: b.id, limit: ALL }),
      readings.listContacts(db, siteId, { boardId: b.id, limit: ALL }),
      readings.listThermal(db, siteId, { boardId: b.id, limit: ALL }),
      readings.listGroundChecks(db, siteId, { boardId: b.id, limit: ALL }),
      repo.defectsOfBoard(db, siteId, b.id, FINISHED),
    ]);

  const compByPos = new Map(components.map((c) => [c.positionId, c]));
  const latestByPos = new Map(latest.map((l) => [l.positionId, l]));
  const photosByPos = new Map<string, ReportPhoto[]>();
  for (const ph of photos) {
    const takenAt = new Date(ph.takenAt);
    if (!inRange(takenAt, days) || !ph.positionId) continue;
    const list = photosByPos.get(ph.positionId) ?? [];
    if (list.filter((x) => x.kind === ph.kind).length < PHOTOS_PER_KIND)
      list.push({ id: ph.id, kind: ph.kind, displayKey: ph.displayKey, caption: ph.caption, takenAt });
    photosByPos.set(ph.positionId, list);
  }
  const ins = insulation.filter((r) => inRange(r.measuredAt, days));
  const con = contacts.filter((r) => inRange(r.measuredAt, days));
  const thm = thermal.filter((r) => inRange(r.measuredAt, days));
  const byComponent = <T extends { componentId: string | null }>(rows: T[]) => {
    const m = new Map<string, T[]>();
    for (const r of rows) if (r.componentId) m.set(r.componentId, [...(m.get(r.componentId) ?? []), r]);
    return m;
  };
  const insBy = byComponent(ins),
    conBy = byComponent(con),
    thmBy = byComponent(thm);

  // Positions in the order of the board's sections, then their own order.
  const sectionOrder = new Map(sections.map((s, i) => [s.id, i]));
  const ordered = [...positions].sort(
    (x, y) =>
      (sectionOrder.get(x.sectionId ?? "") ?? 1e6) - (sectionOrder.get(y.sectionId ?? "") ?? 1e6) ||
      x.sortOrder - y.sortOrder,
  );

  const reportPositions: ReportPosition[] = ordered.map((p) => {
    const c = compByPos.get(p.id);
    const l = latestByPos.get(p.id);
    return {
      id: p.id,
      designation: p.designation,
      kind: p.kind,
      circuit: p.circuit,
      sectionId: p.sectionId,
      gridRow: p.gridRow,
      gridCol: p.gridCol,
      rowSpan: p.rowSpan,
      colSpan: p.colSpan,
      component: c
        ? {
            id: c.id,
            kind: c.kind,
            maker: c.maker,
            model: c.model,
            frame: c.frame,
            mounting: c.mounting,
            ratingAmps: num(c.ratingAmps),
            poles: num(c.poles),
            voltageRating: num(c.voltageRating),
            interruptingKa: num(c.interruptingKa),
            serial: c.serial,
            year: num(c.year),
            meterRange: c.meterRange,
            lampWatts: num(c.lampWatts),
            heritage: c.heritage,
            tagNumber: c.tagNumber,
            custody: c.custody,
            custodyLocation: c.custodyLocation,
            disposition: c.disposition,
            dispositionReason: c.dispositionReason,
            dispositionRecommended: c.dispositionRecommended,
            dispositionOverridden: c.dispositionOverridden,
            decidedByName: c.decidedByName,
            dispositionAt: c.dispositionAt,
            notes: c.notes,
          }
        : null,
      latest: l
        ? {
            inspectedAt: l.inspectedAt,
            inspectorName: l.inspectorName,
            percentRusted: num(l.percentRusted),
            astmGrade: num(l.astmGrade),
            isoRi: l.isoRi,
            belowWaterLine: l.belowWaterLine,
            contaminants: l.contaminants ?? [],
            mechanism: l.mechanism,
            insulation: l.insulation,
            notes: l.notes,
          }
        : null,
      photos: photosByPos.get(p.id) ?? [],
      insulation: c ? (insBy.get(c.id) ?? []) : [],
      contacts: c ? (conBy.get(c.id) ?? []) : [],
      thermal: c ? (thmBy.get(c.id) ?? []) : [],
    };
  });

  const desig = new Map(reportPositions.filter((p) => p.component).map((p) => [p.component!.id, p.designation]));
  const series = new Map<string, { label: string; readings: InsulationReading[] }>();
  for (const r of ins) {
    const key = `${r.componentId ? `c:${r.componentId}` : `circuit:${r.circuit}`}|${r.conductors}`;
    const label = `${r.componentId ? `${desig.get(r.componentId) ?? r.designation ?? "?"}${r.circuit ? ` · ${r.circuit}` : ""}` : r.circuit || "Board"} (${r.conductors.replace(/_/g, " ")})`;
    const s = series.get(key) ?? { label, readings: [] };
    s.readings.push(r);
    series.set(key, s);
  }

  return {
    id: b.id,
    name: b.name,
    location: b.location,
    nominalVolts: Number(b.nominalVolts),
    phases: b.phases,
    frequencyHz: Number(b.frequencyHz),
    earthing: b.earthing,
    yearBuilt: num(b.yearBuilt),
    faceHeightMm: num(b.faceHeightMm),
    waterLineMm: num(b.waterLineMm),
    gridRows: b.gridRows,
    gridCols: b.gridCols,
    drawingRef: b.drawingRef,
    sections: sections.map((s) => ({ id: s.id, name: s.name })),
    positions: reportPositions,
    insulationSeries: [...series.values()].sort((x, y) => x.label.localeCompare(y.label, undefined, { numeric: true })),
    groundChecks: groundChecks.filter((r) => inRange(r.measuredAt, days)),
    defects: defects.map((d) => ({ ...d, priorityScore: Number(d.priorityScore), dueOn: d.dueOn ?? null })),
    rts: null,
  };
}

const num = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));
