/**
 * The readings domain's reads: what other domains (defects' evidence, the survey, return to service,
 * the report) and the readings routes read, each reading with its verdict against the site's
 * criteria. Recording lives in ./service.ts, which tells return to service of each new reading; the
 * reads import nothing from other domains, so a domain that reads readings never depends on that.
 */
import { DEFAULT_CRITERIA, type ReadingCriteria } from "../../src/domain/reading-judgement";
import { GROUND_HUNT_SOURCE, groundHuntFinding } from "../../src/domain/ground-detection";
import type { Criteria, GroundHunt } from "../../src/schemas/readings";
import type { Db } from "../db";
import { notFound } from "../errors";
import { phaseComparisons } from "./comparisons";
import {
  contactDto,
  groundDto,
  huntStepDto,
  insulationDto,
  stepDto,
  thermalDto,
  tripDto,
  type Overrides,
} from "./judge";
import * as repo from "./repository";

/** The boards of the site with the positions and components a reading may be taken on. */
export const readingTargets = async (db: Db, siteId: string) =>
  (await repo.listTargets(db, siteId)).map((b) => ({
    id: b.id,
    name: b.name,
    nominalVolts: Number(b.nominalVolts),
    positionCount: Number(b.positionCount ?? 0),
  }));

/** The site's criteria, or the defaults (version 0) when the curator has set none. */
export async function loadCriteria(db: Db, siteId: string): Promise<Criteria & ReadingCriteria> {
  const row = await repo.getCriteria(db, siteId);
  if (!row) return { ...DEFAULT_CRITERIA, version: 0, updatedAt: null };
  return {
    correctionMethod: row.correctionMethod,
    insulationMedium: row.insulationMedium,
    thermalClass: row.thermalClass,
    minimumMegohms: row.minimumMegohms,
    minimumSource: row.minimumSource,
    contactOutlierPercent: row.contactOutlierPercent,
    dewPointMarginK: row.dewPointMarginK,
    version: row.version,
    updatedAt: row.updatedAt.toISOString(),
  };
}

export async function overridesFor(db: Db, siteId: string, componentIds: Array<string | null>): Promise<Overrides> {
  const ids = [...new Set(componentIds.filter((x): x is string => !!x))];
  const rows = await repo.listOverrides(db, siteId, ids);
  return new Map(
    rows.map((o) => [
      o.componentId,
      { minimumMegohms: o.minimumMegohms, maximumMicroOhms: o.maximumMicroOhms, source: o.source },
    ]),
  );
}

export const overrideDto = (o: NonNullable<Awaited<ReturnType<typeof repo.getOverride>>>) => ({
  componentId: o.componentId,
  minimumMegohms: o.minimumMegohms,
  maximumMicroOhms: o.maximumMicroOhms,
  source: o.source,
  version: o.version,
});

export async function boardOrThrow(db: Db, siteId: string, boardId: string) {
  const board = await repo.findBoard(db, siteId, boardId);
  if (!board) throw notFound("That board");
  return board;
}
export async function componentOrThrow(db: Db, siteId: string, componentId: string) {
  const c = await repo.findComponent(db, siteId, componentId);
  if (!c) throw notFound("That component");
  return c;
}

export type Filter = Omit<repo.ReadingFilter, "siteId"> & { id?: string };

type SiteCriteria = Awaited<ReturnType<typeof loadCriteria>>;

/**
 * Rows judged against the site's criteria and the manufacturer's values of their components. A caller judging
 * several lists at once hands in one read of the criteria.
 */
async function judged<R extends { componentId: string | null }, D>(
  db: Db,
  siteId: string,
  rowsOf: Promise<R[]>,
  dto: (r: R, c: SiteCriteria, o: Overrides) => D,
  criteriaOf: Promise<SiteCriteria> = loadCriteria(db, siteId),
) {
  const [criteria, rows] = await Promise.all([criteriaOf, rowsOf]);
  const overrides = await overridesFor(
    db,
    siteId,
    rows.map((r) => r.componentId),
  );
  return rows.map((r) => dto(r, criteria, overrides));
}
export const listInsulation = (db: Db, siteId: string, f: Filter, criteria?: Promise<SiteCriteria>) =>
  judged(db, siteId, repo.listInsulation(db, { siteId, ...f }), insulationDto, criteria);
export const listContacts = (db: Db, siteId: string, f: Filter, criteria?: Promise<SiteCriteria>) =>
  judged(db, siteId, repo.listContacts(db, { siteId, ...f }), contactDto, criteria);
export async function listThermal(db: Db, siteId: string, f: Filter) {
  return (await repo.listThermal(db, { siteId, ...f })).map(thermalDto);
}
export async function listGroundChecks(db: Db, siteId: string, f: Filter) {
  const [s, rows] = await Promise.all([repo.site(db, siteId), repo.listGroundChecks(db, { siteId, ...f })]);
  return rows.map((r) => groundDto(r, s.kind));
}

/**
 * Readings of each kind a board's or a component's page lists, newest first; `totals` counts them all. A hundred:
 * an insulation reading is ~1.6 kB judged (its sources and reasons), and 500 of them made a board's answer 835 kB
 * for a phone in a hull that shows ten at first; the chart reads its series whole on its own.
 */
export const PAGE_LIST_LIMIT = 100;
/** One insulation series (a component, or a circuit named by hand) is read whole, up to this many. */
export const SERIES_LIMIT = 5_000;
/**
 * Readings of each series and conductor pair the phase comparison reads: the newest two that are valid for judging
 * take part, so a few more in case the newest were taken too close to the dew point.
 */
const COMPARED_PER_PAIR = 6;

export async function boardReadings(db: Db, siteId: string, boardId: string) {
  const board = await boardOrThrow(db, siteId, boardId);
  const limit = PAGE_LIST_LIMIT;
  const criteria = loadCriteria(db, siteId); // one read for the three judged lists
  const [
    insulation,
    contacts,
    thermal,
    groundChecks,
    tripTests,
    stepTests,
    groundHunts,
    positions,
    totals,
    series,
    withReadings,
    compared,
  ] = await Promise.all([
    listInsulation(db, siteId, { boardId, limit }, criteria),
    listContacts(db, siteId, { boardId, limit }, criteria),
    listThermal(db, siteId, { boardId, limit }),
    listGroundChecks(db, siteId, { boardId, limit }),
    listTripTests(db, siteId, { boardId, limit }),
    listStepTests(db, siteId, { boardId, limit }),
    listGroundHunts(db, siteId, boardId),
    repo.boardTargets(db, boardId),
    repo.readingTotals(db, siteId, { boardId }),
    repo.insulationSeries(db, siteId, boardId),
    repo.componentsWithReadings(db, siteId, boardId),
    // Each series' newest readings per conductor pair, however old: a circuit tested last week beside others tested
    // daily keeps its comparison and its trend (the list above holds only the board's newest).
    listInsulation(db, siteId, { boardId, latestPer: COMPARED_PER_PAIR, limit: SERIES_LIMIT }, criteria),
  ]);
  return {
    board: { ...board, nominalVolts: Number(board.nominalVolts) },
    positions,
    insulation,
    contacts,
    thermal,
    groundChecks,
    tripTests,
    stepTests,
    groundHunts,
    phaseComparisons: phaseComparisons(compared),
    totals,
    dryOutSeries: series.map((s) => ({
      componentId: s.componentId,
      designation: s.designation,
      circuit: s.circuit,
      conductors: s.conductors,
      count: s.count,
      latestAt: s.latestAt.toISOString(),
    })),
    componentsWithReadings: withReadings,
  };
}

/**
 * One insulation series of the board, whole (up to SERIES_LIMIT, newest first): a component's readings, or
 * those of a circuit named by hand. The board's dry-out chart draws from it: the board's page lists only the
 * newest readings of the board, and a long dry-out has thousands.
 */
export async function insulationSeriesOf(
  db: Db,
  siteId: string,
  boardId: string,
  of: { componentId: string } | { circuit: string },
) {
  await boardOrThrow(db, siteId, boardId);
  const f = "componentId" in of ? { componentId: of.componentId } : { circuit: of.circuit, handNamed: true };
  const readings = await listInsulation(db, siteId, { boardId, ...f, limit: SERIES_LIMIT });
  return { readings, complete: readings.length < SERIES_LIMIT };
}

export async function componentReadings(db: Db, siteId: string, componentId: string) {
  const c = await componentOrThrow(db, siteId, componentId);
  const limit = PAGE_LIST_LIMIT;
  const [insulation, contacts, thermal, override, tripTests, stepTests, totals] = await Promise.all([
    listInsulation(db, siteId, { componentId, limit: SERIES_LIMIT }),
    listContacts(db, siteId, { componentId, limit }),
    listThermal(db, siteId, { componentId, limit }),
    repo.getOverride(db, siteId, componentId),
    listTripTests(db, siteId, { componentId, limit }),
    listStepTests(db, siteId, { componentId, limit }),
    repo.readingTotals(db, siteId, { componentId }),
  ]);
  return {
    component: {
      id: c.id,
      boardId: c.boardId,
      boardName: c.boardName,
      positionId: c.positionId,
      designation: c.designation,
      circuit: c.circuit,
      kind: c.kind,
      ratedVolts: Number(c.voltageRating ?? c.nominalVolts),
    },
    override: override ? overrideDto(override) : null,
    insulation,
    contacts,
    thermal,
    tripTests,
    stepTests,
    totals,
  };
}

export async function latestGroundCheck(db: Db, siteId: string, boardId: string) {
  await boardOrThrow(db, siteId, boardId);
  return (await listGroundChecks(db, siteId, { boardId, limit: 1 }))[0] ?? null;
}

export async function listTripTests(db: Db, siteId: string, f: Filter) {
  return (await repo.listTripTests(db, { siteId, ...f })).map(tripDto);
}
export async function listStepTests(db: Db, siteId: string, f: Filter) {
  return (await repo.listStepTests(db, { siteId, ...f })).map(stepDto);
}

/** The board's ground hunts, each with its steps in time order and what they point at (groundHuntFinding). */
export async function listGroundHunts(db: Db, siteId: string, boardId: string): Promise<GroundHunt[]> {
  const steps = (await repo.listHuntSteps(db, { siteId, boardId })).map(huntStepDto);
  const byHunt = new Map<string, typeof steps>();
  for (const s of steps) {
    if (!byHunt.has(s.hunt)) byHunt.set(s.hunt, []);
    byHunt.get(s.hunt)!.push(s);
  }
  return [...byHunt]
    .map(([hunt, st]) => ({ hunt, steps: st, finding: groundHuntFinding(st), source: { ...GROUND_HUNT_SOURCE } }))
    .sort((a, b) => Date.parse(b.steps.at(-1)!.measuredAt) - Date.parse(a.steps.at(-1)!.measuredAt));
}
