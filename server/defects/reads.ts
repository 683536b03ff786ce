import type { Db } from "../db";
import { notFound } from "../errors";
import { ACTIVE_STATUSES, allowedTargets, canEdit } from "../../src/domain/defect-workflow";
import { rankDefects } from "../../src/domain/priority";
import { listQuery } from "../../src/schemas/defects";
import { listPage, registerQuery, type RegisterRow } from "./list-repository";
import * as repo from "./repository";
import { scoreFor, type Ctx } from "./service";

const iso = (d: Date | string | null) => (d === null ? null : d instanceof Date ? d.toISOString() : d);
export const toJson = (r: RegisterRow) => ({
  ...r,
  createdAt: iso(r.createdAt)!,
  updatedAt: iso(r.updatedAt)!,
  closedAt: iso(r.closedAt),
});

/** The defect page: the record, why it ranks where it does, who may move it, pins and history. */
export async function detail(db: Db, ctx: Ctx, id: string) {
  const row = await repo.findRow(db, ctx.siteId, id);
  if (!row) throw notFound("That defect");
  const [names, heritage, pins, history, audit, photoCount, rank] = await Promise.all([
    repo.userNames(db, [row.repairedBy, row.verifiedBy, row.createdBy]),
    repo.componentHeritage(db, ctx.siteId, row.componentId),
    repo.pinsOf(db, ctx.siteId, id),
    repo.statusHistory(db, id),
    repo.auditOf(db, ctx.siteId, id),
    repo.photoCount(db, id),
    repo.rankOf(db, ctx.siteId, id),
  ]);
  const { terms } = await scoreFor(db, ctx.siteId, row);
  return {
    defect: {
      ...toJson(row),
      repairedByName: row.repairedBy ? (names.get(row.repairedBy) ?? null) : null,
      verifiedByName: row.verifiedBy ? (names.get(row.verifiedBy) ?? null) : null,
      createdByName: row.createdBy ? (names.get(row.createdBy) ?? null) : null,
    },
    terms,
    rank,
    allowedTargets: allowedTargets(row, ctx.actor),
    canEdit: canEdit(row, ctx.actor),
    heritage,
    photoCount,
    pins: pins.map((p) => ({
      ...p,
      pinnedAt: iso(p.pinnedAt)!,
      removedAt: iso(p.removedAt),
      relativeRef: p.relativeRef ?? null,
    })),
    history: history.map((h) => ({ ...h, at: iso(h.at)! })),
    audit: audit.map((a) => ({ ...a, at: iso(a.at)! })),
  };
}

/**
 * The repair plan: active defects ranked site-wide by rankDefects (pins applied), then
 * grouped by board and section keeping that order, with effort and cost totals per section.
 */
export async function repairPlan(db: Db, siteId: string) {
  const f = listQuery.parse({ status: ACTIVE_STATUSES, sort: "priority", dir: "desc" });
  const rows = (await registerQuery(db, siteId, f, "9999-12-31").execute()) as RegisterRow[];
  const pins = await repo.activePins(db, siteId);
  const pinOf = new Map(pins.map((p) => [p.defectId, { direction: p.direction, relativeTo: p.relativeTo }]));
  const ranked = rankDefects(
    rows.map((r) => ({
      ...r,
      score: r.priorityScore,
      createdAt: r.createdAt.toISOString(),
      pin: pinOf.get(r.id) ?? null,
    })),
  );
  type PlanSection = {
    sectionId: string | null;
    sectionName: string;
    effortHours: number;
    unestimated: number;
    cost: number;
    defects: (ReturnType<typeof toJson> & { rank: number })[];
  };
  const boards = new Map<string, { boardId: string; boardName: string; sections: Map<string, PlanSection> }>();
  ranked.forEach((r, i) => {
    const b = boards.get(r.boardId) ?? { boardId: r.boardId, boardName: r.boardName, sections: new Map() };
    boards.set(r.boardId, b);
    const key = r.sectionId ?? "none";
    const s = b.sections.get(key) ?? {
      sectionId: r.sectionId,
      sectionName: r.sectionName ?? "No section",
      effortHours: 0,
      unestimated: 0,
      cost: 0,
      defects: [],
    };
    b.sections.set(key, s);
    if (r.effortHours === null) s.unestimated += 1;
    s.effortHours += r.effortHours ?? 0;
    s.cost += r.costEstimate ?? 0;
    const { score: _s, pin: _p, ...rest } = r;
    s.defects.push({ ...toJson({ ...rest, createdAt: new Date(r.createdAt) } as RegisterRow), rank: i + 1 });
  });
  return {
    boards: [...boards.values()]
      .sort((a, b) => a.boardName.localeCompare(b.boardName))
      .map((b) => ({
        boardId: b.boardId,
        boardName: b.boardName,
        sections: [...b.sections.values()].sort((x, y) => x.defects[0].rank - y.defects[0].rank),
      })),
  };
}

/** What the defect form offers on this site: its boards, sections and crew. */
export async function formOptions(db: Db, siteId: string) {
  const [boards, sections, crew] = await Promise.all([
    repo.listBoards(db, siteId),
    repo.listSections(db, siteId),
    repo.listCrew(db, siteId),
  ]);
  return { boards, sections, crew };
}

/** The positions of one board a defect may be raised against. */
export const positionsOf = (db: Db, siteId: string, boardId: string) => repo.listPositions(db, siteId, boardId);

/** Where a finding sits (board, position, component, inspection), to prefill a new defect. */
export const findingContext = (db: Db, siteId: string, q: Parameters<typeof repo.findingContext>[2]) =>
  repo.findingContext(db, siteId, q);

/** One page of the register in the list's order, with the total that matches its filters. */
export const registerPage = listPage;
