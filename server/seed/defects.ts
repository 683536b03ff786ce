/**
 * Demo seed step: about 60 defects raised from the demo inspections of MV Kestrel
 * Lantern (invented), across the workflow, a few pinned by the curator with a reason,
 * assigned among the demo crew. Deterministic; runs after the inventory step.
 */
import type { Insertable, Kysely } from "kysely";
import type { Database, DefectsTable } from "../../db/types";
import type { SeedContext } from "./context";
import { priorityScore, type PartsAvailability } from "../../src/domain/priority";
import type { DefectCategory, DefectSeverity, DefectStatus } from "../../src/domain/vocab";

type Db = Kysely<Database>;
type Finding = {
  title: string;
  category: DefectCategory;
  severity: DefectSeverity;
  safety?: boolean;
  blocks?: boolean;
  effort: number | null;
  cost: number | null;
  parts?: string;
  partsState?: PartsAvailability;
};

const FINDINGS: Finding[] = [
  {
    title: "Salt crust across the line terminals",
    category: "contamination",
    severity: "impaired",
    blocks: true,
    effort: 2,
    cost: 0,
  },
  {
    title: "Arc track on the moulded base between poles",
    category: "insulation",
    severity: "disabling",
    safety: true,
    blocks: true,
    effort: 6,
    cost: 180,
    parts: "Base moulding, same frame",
    partsState: "wanted",
  },
  {
    title: "Operating handle seized at mid-travel",
    category: "mechanical",
    severity: "disabling",
    blocks: true,
    effort: 4,
    cost: 40,
    parts: "Trip-free linkage spring",
    partsState: "wanted",
  },
  { title: "Surface rust on the mounting bracket", category: "corrosion", severity: "degraded", effort: 1, cost: 10 },
  { title: "Silt packed behind the escutcheon", category: "contamination", severity: "degraded", effort: 1.5, cost: 0 },
  {
    title: "Load-side lug loose, heat discolouration",
    category: "heat",
    severity: "impaired",
    safety: true,
    effort: 2,
    cost: 25,
    parts: "Lug set",
    partsState: "in_hand",
  },
  {
    title: "Meter glass cracked, water behind the dial",
    category: "enclosure",
    severity: "impaired",
    effort: 3,
    cost: 60,
    parts: "Bezel glass 3½ in",
    partsState: "wanted",
  },
  {
    title: "Ground lamp holder missing",
    category: "missing_part",
    severity: "impaired",
    safety: true,
    blocks: true,
    effort: 1,
    cost: 35,
    parts: "Lamp holder, bayonet",
    partsState: "unobtainable",
  },
  {
    title: "Cable insulation swollen at the gland",
    category: "wiring",
    severity: "impaired",
    safety: true,
    effort: 5,
    cost: 90,
    parts: "Gland and tails",
    partsState: "in_hand",
  },
  { title: "Nameplate lifting, rivets corroded", category: "corrosion", severity: "cosmetic", effort: 0.5, cost: 5 },
  { title: "Mould on the arc chute fibre", category: "contamination", severity: "degraded", effort: null, cost: null },
  {
    title: "Bus tie fixings rusted to the bar",
    category: "corrosion",
    severity: "impaired",
    blocks: true,
    effort: 8,
    cost: 120,
    parts: "Bronze fixings",
    partsState: "in_hand",
  },
  {
    title: "Door seal perished, gap along the bottom",
    category: "enclosure",
    severity: "degraded",
    effort: 2,
    cost: 45,
  },
  {
    title: "Terminal strip charred at the neutral link",
    category: "heat",
    severity: "disabling",
    safety: true,
    blocks: true,
    effort: 3,
    cost: 30,
    parts: "Terminal strip, 12-way",
    partsState: "wanted",
  },
  { title: "Stiff mechanism after drying", category: "mechanical", severity: "impaired", effort: 2.5, cost: 0 },
];
const PIN_REASONS = [
  "Do it while the feeder panel is stripped: the same enclosure is open this week.",
  "Wait for the bronze fixings; no point opening it twice.",
  "The surveyor asked to see this one before anything else is refitted.",
];
const STATUS_PLAN: DefectStatus[] = [
  "raised",
  "raised",
  "scheduled",
  "scheduled",
  "under_repair",
  "awaiting_retest",
  "closed",
  "raised",
  "deferred",
  "scheduled",
  "accepted_as_is",
  "under_repair",
];

export async function seedDefects(db: Db, ctx: SeedContext) {
  const { siteId } = ctx;
  const curator = ctx.people["curator@tideline.test"];
  const volunteer = ctx.people["volunteer@tideline.test"];
  const rows = await db
    .selectFrom("inspections as i")
    .innerJoin("positions as p", "p.id", "i.positionId")
    .innerJoin("components as c", "c.id", "i.componentId")
    .select([
      "i.id",
      "i.positionId",
      "i.componentId",
      "i.inspectedAt",
      "i.inspectorId",
      "p.boardId",
      "p.sectionId",
      "p.designation",
      "c.heritage",
    ])
    .where("i.siteId", "=", siteId)
    .orderBy("i.astmGrade", (ob) => ob.asc().nullsLast())
    .orderBy("p.designation")
    .limit(60)
    .execute();
  const defects: Array<Insertable<DefectsTable> & { id?: string }> = [];
  rows.forEach((ins, n) => {
    const f = FINDINGS[n % FINDINGS.length];
    const status = STATUS_PLAN[n % STATUS_PLAN.length];
    const partsState = f.partsState ?? "none_needed";
    const { score } = priorityScore({
      severity: f.severity,
      safetyCritical: !!f.safety,
      blocksEnergisation: !!f.blocks,
      originalFabric: ins.heritage === "original",
      effortHours: f.effort,
      partsAvailable: partsState,
    });
    const raisedBy = ins.inspectorId ?? volunteer;
    const createdAt = new Date((ins.inspectedAt as Date).getTime() + 3_600_000);
    const assigneeId = status === "raised" ? null : n % 3 === 0 ? curator : volunteer;
    const repairedBy =
      status === "awaiting_retest" || status === "closed" ? (assigneeId === curator ? volunteer : assigneeId) : null;
    defects.push({
      siteId,
      boardId: ins.boardId,
      sectionId: ins.sectionId,
      positionId: ins.positionId,
      componentId: ins.componentId,
      inspectionId: ins.id,
      title: `${f.title} (${ins.designation})`,
      description: `Raised from the survey of position ${ins.designation}.`,
      category: f.category,
      severity: f.severity,
      safetyCritical: !!f.safety,
      blocksEnergisation: !!f.blocks,
      effortHours: f.effort,
      costEstimate: f.cost,
      partsNeeded: f.parts ?? "",
      partsState,
      assigneeId,
      dueOn: assigneeId ? `2026-12-${String(3 + (n % 25)).padStart(2, "0")}` : null,
      status,
      statusReason:
        status === "deferred"
          ? "Wait for the board to finish drying out before touching it."
          : status === "accepted_as_is"
            ? "Cosmetic on a modern replacement part; leave as is."
            : "",
      repairedBy,
      verifiedBy: status === "closed" ? curator : null,
      closedAt: status === "closed" ? new Date(createdAt.getTime() + 5 * 86_400_000) : null,
      createdBy: raisedBy,
      priorityScore: score,
      createdAt,
      updatedAt: createdAt,
    });
  });
  if (!defects.length) return;
  const inserted = await db
    .insertInto("defects")
    .values(defects)
    .returning(["id", "status", "createdBy", "createdAt", "boardId", "positionId"])
    .execute();
  const history = inserted.flatMap((d) => {
    const at = d.createdAt as Date;
    const steps: DefectStatus[] =
      d.status === "raised"
        ? ["raised"]
        : d.status === "closed"
          ? ["raised", "scheduled", "under_repair", "awaiting_retest", "closed"]
          : ["raised", d.status];
    return steps.map((to, k) => ({
      siteId,
      defectId: d.id,
      fromStatus: k ? steps[k - 1] : null,
      toStatus: to,
      actorId: to === "under_repair" || to === "awaiting_retest" ? volunteer : k ? curator : d.createdBy,
      at: new Date(at.getTime() + k * 86_400_000),
      reason: "",
    }));
  });
  await db.insertInto("defectStatusChanges").values(history).execute();
  await db
    .insertInto("auditLog")
    .values(
      inserted.map((d) => ({
        siteId,
        entityType: "defect",
        entityId: d.id,
        boardId: d.boardId,
        positionId: d.positionId,
        action: "create",
        actorId: d.createdBy,
        at: d.createdAt,
      })),
    )
    .execute();
  // Three pins, each against an unpinned defect in its own place (pins do not chain).
  const active = inserted.filter((d) => d.status !== "closed" && d.status !== "accepted_as_is");
  const pins = [
    [active[20], active[3], "above"],
    [active[9], active[1], "below"],
    [active[30], active[5], "above"],
  ] as const;
  await db
    .insertInto("defectPins")
    .values(
      pins
        .filter(([a, b]) => a && b)
        .map(([a, b, direction], k) => ({
          siteId,
          defectId: a.id,
          relativeTo: b.id,
          direction,
          reason: PIN_REASONS[k],
          pinnedBy: curator,
        })),
    )
    .execute();
}
