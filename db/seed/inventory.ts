/**
 * Demo seed step: the survey of MV Kestrel Lantern's boards (invented). One flood event,
 * the boards of inventory-layout.ts, a component per position, inspections across the
 * rust-grade range, dispositions (a few curator overrides with reasons), custody spread
 * over the chain and the audit rows a history shows. Deterministic; one insert per table.
 */
import { randomUUID } from "node:crypto";
import type { Kysely, Insertable } from "kysely";
import type { Database, InspectionsTable, CustodyMovesTable, DispositionDecisionsTable, AuditLogTable, ComponentsTable } from "../types";
import type { SeedContext } from "./demo";
import type { Contaminant, Custody, Disposition, Heritage, InsulationState, Mechanism } from "../../src/domain/vocab";
import { astmD610Grade, iso4628RiGrade } from "../../src/domain/corrosion";
import { recommendDisposition } from "../../src/domain/flood-guidance";
import { SEED_BOARDS, nameplateFor, seededRandom, type SeedBoard, type SeedPosition } from "./inventory-layout";

type Db = Kysely<Database>;
type Rnd = ReturnType<typeof seededRandom>;

const FLOOD = { occurredOn: "2026-10-14", waterType: "salt" as const, maxDepthM: 1.1, hoursSubmerged: 30 };
const day = (d: number, hour = 10) => new Date(Date.UTC(2026, 9, 14 + d, hour, Math.floor(d * 7) % 60));

const BELOW_RUST = [0.5, 2, 5, 8, 12, 15, 20, 30, 40, 55, 70];
const ABOVE_RUST = [0, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2];
const MOVING_KINDS = new Set(["molded_case_breaker", "power_breaker", "bus_tie", "switch", "relay"]);
const CHAIN: Custody[] = ["in_place", "removed", "in_workshop", "ready_to_refit", "refitted"];
const LOCATION: Record<Custody, string> = {
  in_place: "In its position", removed: "Bag rack A, engine-room flat", in_workshop: "Workshop bench 2",
  ready_to_refit: "Refit shelf, engine-room flat", refitted: "In its position", scrapped: "Scrap bin (kept for parts)", missing: "Not found at the last check",
};
const OVERRIDE: Partial<Record<Disposition, { to: Disposition; reason: string }>> = {
  source: { to: "rebuild", reason: "Original fabric: the restorer judges it sound enough to strip and rebuild rather than hunt for another." },
  replace: { to: "rebuild", reason: "Keep the original pattern: rebuild under the qualified electrician, re-test before it goes back." },
  rebuild: { to: "replace", reason: "Moulding cracked behind the arc chute once opened; not worth rebuilding." },
  clean: { to: "rebuild", reason: "Salt crust found under the cover once opened: strip it down." },
};

/** On the board the water never reached, some parts were only splashed on the front. */
const DRY_INSIDE = { to: "clean" as Disposition, reason: "Spray reached the front only; dry and clean inside when opened, so clean and re-test rather than strip." };

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
  if (d === "rebuild") return rnd.pick<Custody>(["removed", "in_workshop", "in_workshop", "ready_to_refit", "refitted"]);
  return rnd.pick<Custody>(["in_place", "in_place", "refitted", "ready_to_refit"]);
}

function custodyPath(target: Custody): Custody[] {
  if (target === "in_place") return [];
  if (target === "scrapped") return ["removed", "in_workshop", "scrapped"];
  if (target === "missing") return ["removed", "missing"];
  return CHAIN.slice(1, CHAIN.indexOf(target) + 1);
}

export async function seedInventory(db: Db, ctx: SeedContext) {
  const rnd = seededRandom(19461014);
  const { siteId } = ctx;
  const volunteer = ctx.people["volunteer@tideline.test"];
  const curator = ctx.people["curator@tideline.test"];
  const audit: Insertable<AuditLogTable>[] = [];
  const inspections: Insertable<InspectionsTable>[] = [];
  const moves: Insertable<CustodyMovesTable>[] = [];
  const decisions: Insertable<DispositionDecisionsTable>[] = [];
  const components: Insertable<ComponentsTable>[] = [];
  const flood = await db.insertInto("floodEvents").values({ siteId, ...FLOOD, notes: "Harbour water over the engine-room plates while laid up; pumped out after about 30 hours (invented scenario)." }).returning("id").executeTakeFirstOrThrow();
  audit.push({ siteId, entityType: "flood_event", entityId: flood.id, action: "create", actorId: curator, at: day(2), after: JSON.stringify(FLOOD) });
  let n = 0;
  let tag = 401;
  let overrides = 0;
  for (const b of SEED_BOARDS) {
    const { sections: sectionNames, positions: layout, ...boardFields } = b;
    const board = await db.insertInto("boards").values({ siteId, ...boardFields, phases: 3, frequencyHz: 60, earthing: "ungrounded" }).returning("id").executeTakeFirstOrThrow();
    audit.push({ siteId, entityType: "board", entityId: board.id, boardId: board.id, action: "create", actorId: curator, at: day(2), after: JSON.stringify({ name: b.name }) });
    const sections = await db.insertInto("sections").values(sectionNames.map((name, i) => ({ siteId, boardId: board.id, name, sortOrder: i }))).returning(["id", "name"]).execute();
    const sectionId = new Map(sections.map((s) => [s.name, s.id]));
    const positions = layout.map((p, i) => ({
      id: randomUUID(), siteId, boardId: board.id, sectionId: sectionId.get(p.section) ?? null, designation: p.designation, kind: p.kind,
      gridRow: p.row, gridCol: p.col, rowSpan: p.rowSpan ?? 1, colSpan: p.colSpan ?? 1, circuit: p.circuit, sortOrder: i,
    }));
    await db.insertInto("positions").values(positions).execute();
    layout.forEach((p, i) => {
      n++;
      const positionId = positions[i].id;
      const componentId = randomUUID();
      const heritage = heritageOf(p, rnd);
      const below = belowWaterLine(b, p);
      audit.push({ siteId, entityType: "position", entityId: positionId, boardId: board.id, positionId, action: "create", actorId: curator, at: day(3), after: JSON.stringify({ designation: p.designation, kind: p.kind }) });
      // Inspections: most positions once, some twice (the newest is current).
      const count = rnd.chance(0.12) ? 0 : rnd.chance(0.2) ? 2 : 1;
      let latest: Insertable<InspectionsTable> | null = null;
      for (let k = 0; k < count; k++) {
        const pct = p.kind === "busbar" || rnd.chance(0.05) ? null : rnd.pick(below ? BELOW_RUST : ABOVE_RUST);
        const at = k === 0 ? day(5 + Math.floor(rnd.between(0, 18)), 9 + (n % 8)) : day(27 + Math.floor(rnd.between(0, 16)), 9 + (n % 8));
        latest = {
          id: randomUUID(), siteId, componentId, positionId, inspectorId: rnd.chance(0.75) ? volunteer : curator, inspectedAt: at, createdAt: at,
          percentRusted: pct, astmGrade: pct === null ? null : astmD610Grade(pct), isoRi: pct === null ? null : iso4628RiGrade(pct),
          belowWaterLine: below, contaminants: contaminants(below, rnd), insulation: insulation(below, rnd), mechanism: mechanism(p.kind, rnd),
          notes: k === 1 ? "Re-inspected after the first wash-down." : below ? "Tide mark across the face; silt behind the escutcheon." : "",
        };
        inspections.push(latest);
        audit.push({ siteId, entityType: "inspection", entityId: latest.id!, boardId: board.id, positionId, action: "inspect", actorId: latest.inspectorId ?? null, at, after: JSON.stringify({ percentRusted: pct, astmGrade: latest.astmGrade, isoRi: latest.isoRi }) });
      }
      // Disposition from the flood guidance; every ninth decision is a curator override.
      let disposition: Disposition | null = null;
      let recommended: Disposition | null = null;
      let reason = "";
      let decidedAt: Date | null = null;
      if (latest && rnd.chance(0.65)) {
        recommended = recommendDisposition({
          kind: p.kind, waterType: FLOOD.waterType, belowWaterLine: below, hoursSubmerged: below ? FLOOD.hoursSubmerged : undefined,
          contaminants: latest.contaminants as Contaminant[], insulation: latest.insulation ?? undefined, mechanism: latest.mechanism ?? undefined,
          percentRusted: latest.percentRusted ?? undefined, heritage,
        }).disposition;
        disposition = recommended;
        const alt = b.waterLineMm === null && recommended === "rebuild" ? DRY_INSIDE : OVERRIDE[recommended];
        if (alt && (n % 9 === 4 || (alt === DRY_INSIDE && n % 4 === 1)) && overrides < 12) {
          disposition = alt.to;
          reason = alt.reason;
          overrides++;
        }
        decidedAt = new Date((latest.inspectedAt as Date).getTime() + 86_400_000);
        decisions.push({ siteId, componentId, disposition, recommended, overridden: disposition !== recommended, reason, decidedBy: curator, decidedAt });
        audit.push({ siteId, entityType: "component", entityId: componentId, boardId: board.id, positionId, action: "disposition", actorId: curator, at: decidedAt, before: JSON.stringify({ disposition: null }), after: JSON.stringify({ disposition, recommended, overridden: disposition !== recommended, reason }) });
      }
      // Custody: walk the chain to where this component is now.
      const path = custodyPath(custodyTarget(disposition, rnd, n));
      let from: Custody = "in_place";
      let movedAt = decidedAt ?? (latest?.inspectedAt as Date | undefined) ?? day(6);
      const tagged = path.length > 0 || rnd.chance(0.2);
      for (const to of path) {
        movedAt = new Date(movedAt.getTime() + 36 * 3_600_000);
        moves.push({ siteId, componentId, fromState: from, toState: to, location: LOCATION[to], note: to === "removed" ? "Tagged and bagged with its screws." : "", movedBy: to === "scrapped" ? curator : volunteer, movedAt });
        audit.push({ siteId, entityType: "component", entityId: componentId, boardId: board.id, positionId, action: "custody", actorId: to === "scrapped" ? curator : volunteer, at: movedAt, before: JSON.stringify({ custody: from }), after: JSON.stringify({ custody: to, location: LOCATION[to] }) });
        from = to;
      }
      components.push({
        id: componentId, siteId, positionId, kind: p.kind, ...nameplateFor(p.kind, heritage, rnd), heritage,
        serial: `${p.kind === "meter" ? "CIW" : "HB"}-${(4600 + n * 37) % 99999}`,
        tagNumber: tagged ? `KL-${String(tag++).padStart(4, "0")}` : null,
        custody: from, custodyLocation: LOCATION[from], disposition, dispositionRecommended: recommended,
        dispositionOverridden: disposition !== null && disposition !== recommended, dispositionReason: reason,
        dispositionBy: disposition ? curator : null, dispositionAt: decidedAt, version: 1 + path.length + (disposition ? 1 : 0),
      });
    });
  }
  await db.insertInto("components").values(components).execute();
  if (inspections.length) await db.insertInto("inspections").values(inspections).execute();
  if (moves.length) await db.insertInto("custodyMoves").values(moves).execute();
  if (decisions.length) await db.insertInto("dispositionDecisions").values(decisions).execute();
  for (let i = 0; i < audit.length; i += 1000) await db.insertInto("auditLog").values(audit.slice(i, i + 1000)).execute();
}
