/**
 * Demo seed step: the survey of MV Kestrel Lantern's boards (invented). One flood event,
 * the boards of inventory-layout.ts, a component per position, inspections across the
 * rust-grade range, dispositions (a few curator overrides with reasons), custody spread
 * over the chain and the audit rows a history shows. Deterministic; one insert per table.
 */
import { randomUUID } from "node:crypto";
import type { Kysely, Insertable } from "kysely";
import type {
  Database,
  InspectionsTable,
  CustodyMovesTable,
  DispositionDecisionsTable,
  AuditLogTable,
  ComponentsTable,
} from "../../db/types";
import type { SeedContext } from "./context";
import type { Contaminant, Custody, Disposition, Heritage, InsulationState, Mechanism } from "../../src/domain/vocab";
import { astmD610Grade, iso4628RiGrade } from "../../src/domain/corrosion";
import { recommendDisposition } from "../../src/domain/flood-guidance";
import { SEED_BOARDS, nameplateFor, seededRandom, type SeedBoard, type SeedPosition } from "./inventory-layout";
import { onSiteClock } from "./clock";

type Db = Kysely<Database>;
type Rnd = ReturnType<typeof seededRandom>;

const FLOOD = { occurredOn: "2026-10-14", waterType: "salt" as const, maxDepthM: 1.1, hoursSubmerged: 30 };
const day = (d: number, hour = 10) => onSiteClock(2026, 9, 14 + d, hour, Math.floor(d * 7) % 60);

const BELOW_RUST = [0.5, 2, 5, 8, 12, 15, 20, 30, 40, 55, 70];
const ABOVE_RUST = [0, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2];
const MOVING_KINDS = new Set(["molded_case_breaker", "power_breaker", "bus_tie", "switch", "relay"]);
const CHAIN: Custody[] = ["in_place", "removed", "in_workshop", "ready_to_refit", "refitted"];
const LOCATION: Record<Custody, string> = {
  in_place: "In its position",
  removed: "Bag rack A, engine-room flat",
  in_workshop: "Workshop bench 2",
  ready_to_refit: "Refit shelf, engine-room flat",
  refitted: "In its position",
  scrapped: "Scrap bin (kept for parts)",
  missing: "Not found at the last check",
};
const OVERRIDE: Partial<Record<Disposition, { to: Disposition; reason: string }>> = {
  source: {
    to: "rebuild",
    reason: "Original fabric: the restorer judges it sound enough to strip and rebuild rather than hunt for another.",
  },
  replace: {
    to: "rebuild",
    reason: "Keep the original pattern: rebuild under the qualified electrician, re-test before it goes back.",
  },
  rebuild: { to: "replace", reason: "Moulding cracked behind the arc chute once opened; not worth rebuilding." },
  clean: { to: "rebuild", reason: "Salt crust found under the cover once opened: strip it down." },
};

/** On the board the water never reached, some parts were only splashed on the front. */
const DRY_INSIDE = {
  to: "clean" as Disposition,
  reason: "Spray reached the front only; dry and clean inside when opened, so clean and re-test rather than strip.",
};

/** True when the bottom edge of the position sat below the flood's water line on the face. */
function belowWaterLine(b: SeedBoard, p: SeedPosition) {
  if (b.waterLineMm === null) return false;
  const rowMm = b.faceHeightMm / b.gridRows;
  return b.faceHeightMm - (p.row - 1 + (p.rowSpan ?? 1)) * rowMm < b.waterLineMm;
}

function heritageOf(p: SeedPosition, rnd: Rnd): Heritage {
  if (p.kind === "busbar" || p.kind === "bus_tie") return "original";
  const x = rnd.next();
  return x < 0.8 ? "original" : x < 0.93 ? "period" : "modern";
}

function contaminants(below: boolean, rnd: Rnd): Contaminant[] {
  const out: Contaminant[] = [];
  if (below && rnd.chance(0.7)) out.push("silt");
  if (rnd.chance(below ? 0.6 : 0.3)) out.push("salt_crust");
  if (rnd.chance(below ? 0.15 : 0.08)) out.push("mould");
  if (below && rnd.chance(0.1)) out.push("oil");
  if (below && rnd.chance(0.25)) out.push("water_inside");
  return out;
}

function insulation(below: boolean, rnd: Rnd): InsulationState {
  const x = rnd.next();
  if (!below) return x < 0.9 ? "intact" : "tracking";
  return x < 0.7 ? "intact" : x < 0.85 ? "tracking" : x < 0.92 ? "charred" : "swollen";
}

function mechanism(kind: string, rnd: Rnd): Mechanism | null {
  if (!MOVING_KINDS.has(kind)) return null;
  const x = rnd.next();
  return x < 0.4 ? "not_tried" : x < 0.65 ? "free" : x < 0.9 ? "stiff" : "seized";
}

/** Where the component ends up in the custody chain, from its disposition. */
function custodyTarget(d: Disposition | null, rnd: Rnd, n: number): Custody {
  if (n % 47 === 11) return "missing";
  if (d === null) return rnd.chance(0.25) ? "removed" : "in_place";
  if (d === "replace") return rnd.pick<Custody>(["removed", "in_workshop", "scrapped", "scrapped"]);
  if (d === "source") return rnd.pick<Custody>(["removed", "in_workshop", "in_place"]);
  if (d === "rebuild")
    return rnd.pick<Custody>(["removed", "in_workshop", "in_workshop", "ready_to_refit", "refitted"]);
  return rnd.pick<Custody>(["in_place", "in_place", "refitted", "ready_to_refit"]);
}

function custodyPath(target: Custody): Custody[] {
  if (target === "in_place") return [];
  if (target === "scrapped") return ["removed", "in_workshop", "scrapped"];
  if (target === "missing") return ["removed", "missing"];
  return CHAIN.slice(1, CHAIN.indexOf(target) + 1);
}

interface Spot {
  board: SeedBoard;
  boardId: string;
  p: SeedPosition;
  positionId: string;
  componentId: string;
  below: boolean;
  heritage: Heritage;
}
type Decided = {
  disposition: Disposition | null;
  recommended: Disposition | null;
  reason: string;
  decidedAt: Date | null;
};

/** Collects every row of the survey in memory, then writes each table in one statement. */
class SurveyBuilder {
  audit: Insertable<AuditLogTable>[] = [];
  inspections: Insertable<InspectionsTable>[] = [];
  moves: Insertable<CustodyMovesTable>[] = [];
  decisions: Insertable<DispositionDecisionsTable>[] = [];
  components: Insertable<ComponentsTable>[] = [];
  private n = 0;
  private tag = 401;
  private overrides = 0;
  private dryOverrides = 0;
  constructor(
    private siteId: string,
    private rnd: Rnd,
    private volunteer: string,
    private curator: string,
  ) {}

  log(
    s: { boardId: string; positionId: string | null } | null,
    entityType: string,
    entityId: string,
    action: string,
    actorId: string,
    at: Date,
    before: unknown,
    after: unknown,
  ) {
    this.audit.push({
      siteId: this.siteId,
      entityType,
      entityId,
      boardId: s?.boardId ?? null,
      positionId: s?.positionId ?? null,
      action,
      actorId,
      at,
      before: before === null ? null : JSON.stringify(before),
      after: JSON.stringify(after),
    });
  }

  add(s: Spot) {
    this.n++;
    this.log(s, "position", s.positionId, "create", this.curator, day(3), null, {
      designation: s.p.designation,
      kind: s.p.kind,
    });
    const latest = this.inspect(s);
    const decided = this.decide(s, latest);
    const path = custodyPath(custodyTarget(decided.disposition, this.rnd, this.n));
    const custody = this.walk(s, path, decided.decidedAt ?? (latest?.inspectedAt as Date | undefined) ?? day(6));
    const tagged = path.length > 0 || this.rnd.chance(0.2);
    this.components.push({
      id: s.componentId,
      siteId: this.siteId,
      positionId: s.positionId,
      kind: s.p.kind,
      ...nameplateFor(s.p.kind, s.heritage, this.rnd, s.p.circuit),
      heritage: s.heritage,
      serial: `${s.p.kind === "meter" ? "CIW" : "HB"}-${(4600 + this.n * 37) % 99999}`,
      tagNumber: tagged ? `KL-${String(this.tag++).padStart(4, "0")}` : null,
      custody,
      custodyLocation: LOCATION[custody],
      disposition: decided.disposition,
      dispositionRecommended: decided.recommended,
      dispositionOverridden: decided.disposition !== null && decided.disposition !== decided.recommended,
      dispositionReason: decided.reason,
      dispositionBy: decided.disposition ? this.curator : null,
      dispositionAt: decided.decidedAt,
      version: 1 + path.length + (decided.disposition ? 1 : 0),
    });
  }

  /** Most positions inspected once, some twice (the newest is current), some not yet. */
  private inspect(s: Spot) {
    const { rnd, n } = this;
    const count = rnd.chance(0.12) ? 0 : rnd.chance(0.2) ? 2 : 1;
    let latest: Insertable<InspectionsTable> | null = null;
    for (let k = 0; k < count; k++) {
      const pct = s.p.kind === "busbar" || rnd.chance(0.05) ? null : rnd.pick(s.below ? BELOW_RUST : ABOVE_RUST);
      const at =
        k === 0
          ? day(5 + Math.floor(rnd.between(0, 18)), 9 + (n % 8))
          : day(27 + Math.floor(rnd.between(0, 16)), 9 + (n % 8));
      latest = {
        id: randomUUID(),
        siteId: this.siteId,
        componentId: s.componentId,
        positionId: s.positionId,
        inspectorId: rnd.chance(0.75) ? this.volunteer : this.curator,
        inspectedAt: at,
        createdAt: at,
        percentRusted: pct,
        astmGrade: pct === null ? null : astmD610Grade(pct),
        isoRi: pct === null ? null : iso4628RiGrade(pct),
        belowWaterLine: s.below,
        contaminants: contaminants(s.below, rnd),
        insulation: insulation(s.below, rnd),
        mechanism: mechanism(s.p.kind, rnd),
        notes:
          k === 1
            ? "Re-inspected after the first wash-down."
            : s.below
              ? "Tide mark across the face; silt behind the escutcheon."
              : "",
      };
      this.inspections.push(latest);
      this.log(s, "inspection", latest.id!, "inspect", latest.inspectorId!, at, null, {
        percentRusted: pct,
        astmGrade: latest.astmGrade,
        isoRi: latest.isoRi,
      });
    }
    return latest;
  }

  /** Two thirds of inspected parts decided, from the flood guidance; a few curator overrides. */
  private decide(s: Spot, latest: Insertable<InspectionsTable> | null): Decided {
    if (!latest || !this.rnd.chance(0.65)) return { disposition: null, recommended: null, reason: "", decidedAt: null };
    const recommended = recommendDisposition({
      kind: s.p.kind,
      waterType: FLOOD.waterType,
      belowWaterLine: s.below,
      hoursSubmerged: s.below ? FLOOD.hoursSubmerged : undefined,
      contaminants: latest.contaminants as Contaminant[],
      insulation: latest.insulation ?? undefined,
      mechanism: latest.mechanism ?? undefined,
      percentRusted: latest.percentRusted ?? undefined,
      heritage: s.heritage,
    }).disposition;
    let disposition = recommended;
    let reason = "";
    const alt = s.board.waterLineMm === null && recommended === "rebuild" ? DRY_INSIDE : OVERRIDE[recommended];
    const dry = alt === DRY_INSIDE;
    if (alt && (dry ? this.n % 4 === 1 && this.dryOverrides < 3 : this.n % 9 === 4 && this.overrides < 8)) {
      disposition = alt.to;
      reason = alt.reason;
      if (dry) this.dryOverrides++;
      else this.overrides++;
    }
    const decidedAt = new Date((latest.inspectedAt as Date).getTime() + 86_400_000);
    const overridden = disposition !== recommended;
    this.decisions.push({
      siteId: this.siteId,
      componentId: s.componentId,
      disposition,
      recommended,
      overridden,
      reason,
      decidedBy: this.curator,
      decidedAt,
    });
    this.log(
      s,
      "component",
      s.componentId,
      "disposition",
      this.curator,
      decidedAt,
      { disposition: null },
      { disposition, recommended, dispositionOverridden: overridden, dispositionReason: reason },
    );
    return { disposition, recommended, reason, decidedAt };
  }

  /** Moves the component along its custody path; returns where it is now. */
  private walk(s: Spot, path: Custody[], start: Date): Custody {
    let from: Custody = "in_place";
    let movedAt = start;
    for (const to of path) {
      movedAt = new Date(movedAt.getTime() + 36 * 3_600_000);
      const by = to === "scrapped" ? this.curator : this.volunteer;
      this.moves.push({
        siteId: this.siteId,
        componentId: s.componentId,
        fromState: from,
        toState: to,
        location: LOCATION[to],
        note: to === "removed" ? "Tagged and bagged with its screws." : "",
        movedBy: by,
        movedAt,
      });
      this.log(
        s,
        "component",
        s.componentId,
        "custody",
        by,
        movedAt,
        { custody: from },
        { custody: to, custodyLocation: LOCATION[to] },
      );
      from = to;
    }
    return from;
  }

  async flush(db: Db) {
    await db.insertInto("components").values(this.components).execute();
    if (this.inspections.length) await db.insertInto("inspections").values(this.inspections).execute();
    if (this.moves.length) await db.insertInto("custodyMoves").values(this.moves).execute();
    if (this.decisions.length) await db.insertInto("dispositionDecisions").values(this.decisions).execute();
    for (let i = 0; i < this.audit.length; i += 1000)
      await db
        .insertInto("auditLog")
        .values(this.audit.slice(i, i + 1000))
        .execute();
  }
}

async function insertBoard(db: Db, siteId: string, b: SeedBoard) {
  const { sections: sectionNames, positions: layout, ...boardFields } = b;
  const board = await db
    .insertInto("boards")
    .values({ siteId, ...boardFields, phases: 3, frequencyHz: 60, earthing: "ungrounded" })
    .returning("id")
    .executeTakeFirstOrThrow();
  const sections = await db
    .insertInto("sections")
    .values(sectionNames.map((name, i) => ({ siteId, boardId: board.id, name, sortOrder: i })))
    .returning(["id", "name"])
    .execute();
  const sectionId = new Map(sections.map((s) => [s.name, s.id]));
  const positions = layout.map((p, i) => ({
    id: randomUUID(),
    siteId,
    boardId: board.id,
    sectionId: sectionId.get(p.section) ?? null,
    designation: p.designation,
    kind: p.kind,
    gridRow: p.row,
    gridCol: p.col,
    rowSpan: p.rowSpan ?? 1,
    colSpan: p.colSpan ?? 1,
    circuit: p.circuit,
    sortOrder: i,
  }));
  await db.insertInto("positions").values(positions).execute();
  return { boardId: board.id, positionIds: positions.map((p) => p.id) };
}

export async function seedInventory(db: Db, ctx: SeedContext) {
  const rnd = seededRandom(19461014);
  const { siteId } = ctx;
  const curator = ctx.people["curator@tideline.test"];
  const survey = new SurveyBuilder(siteId, rnd, ctx.people["volunteer@tideline.test"], curator);
  const notes =
    "Harbour water over the engine-room plates while laid up; pumped out after about 30 hours (invented scenario).";
  const flood = await db
    .insertInto("floodEvents")
    .values({ siteId, ...FLOOD, notes })
    .returning("id")
    .executeTakeFirstOrThrow();
  survey.log(null, "flood_event", flood.id, "create", curator, day(2), null, FLOOD);
  for (const board of SEED_BOARDS) {
    const { boardId, positionIds } = await insertBoard(db, siteId, board);
    survey.log({ boardId, positionId: null }, "board", boardId, "create", curator, day(2), null, { name: board.name });
    board.positions.forEach((p, i) =>
      survey.add({
        board,
        boardId,
        p,
        positionId: positionIds[i],
        componentId: randomUUID(),
        below: belowWaterLine(board, p),
        heritage: heritageOf(p, rnd),
      }),
    );
  }
  await survey.flush(db);
}
