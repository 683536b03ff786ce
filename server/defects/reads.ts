import type { Db } from "../db";
import { notFound } from "../errors";
import { ACTIVE_STATUSES, allowedTargets, canEdit } from "../../src/domain/defect-workflow";
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
 * The repair plan's first page: per board and section, how many active defects, their effort (and how many have
 * none), their cost and the best place among them in the site's ranked order (pins applied). Aggregated in SQL:
 * it grows with boards and sections, not defects (sent whole, the plan was every active defect of the site:
 * 43.7 MB at 200,000 positions, DEVELOPERS.md "The repair plan by board").
 */
export async function repairPlan(db: Db, siteId: string) {
  const rows = await repo.planTotals(db, siteId, ACTIVE_STATUSES);
  type Totals = { count: number; effortHours: number; unestimated: number; cost: number; firstRank: number };
  const boards = new Map<
    string,
    Totals & {
      boardId: string;
      boardName: string;
      sections: (Totals & { sectionId: string | null; sectionName: string })[];
    }
  >();
  for (const r of rows) {
    const t: Totals = {
      count: Number(r.n),
      effortHours: Number(r.effort ?? 0),
      unestimated: Number(r.unestimated),
      cost: Number(r.cost ?? 0),
      firstRank: Number(r.firstPlace),
    };
    const b = boards.get(r.boardId) ?? {
      boardId: r.boardId,
      boardName: r.boardName,
      count: 0,
      effortHours: 0,
      unestimated: 0,
      cost: 0,
      firstRank: t.firstRank, // rows come best place first
      sections: [],
    };
    boards.set(r.boardId, b);
    b.count += t.count;
    b.effortHours += t.effortHours;
    b.unestimated += t.unestimated;
    b.cost += t.cost;
    b.sections.push({ sectionId: r.sectionId, sectionName: r.sectionName ?? "No section", ...t });
  }
  return { boards: [...boards.values()].sort((a, b) => a.boardName.localeCompare(b.boardName)) };
}

/**
 * One board's part of the repair plan: its active defects by section, each with its place in the site's ranked
 * order (the same numbers as the first page's), sections in the order of their best place, with totals.
 */
export async function boardRepairPlan(db: Db, siteId: string, boardId: string) {
  const f = listQuery.parse({ status: ACTIVE_STATUSES, board: [boardId], sort: "priority", dir: "desc" });
  const [board, rows, places] = await Promise.all([
    repo.boardName(db, siteId, boardId),
    registerQuery(db, siteId, f, "9999-12-31").execute() as Promise<RegisterRow[]>,
    repo.planPlacesOnBoard(db, siteId, boardId, ACTIVE_STATUSES),
  ]);
  if (!board) throw notFound("That board");
  type PlanSection = {
    sectionId: string | null;
    sectionName: string;
    effortHours: number;
    unestimated: number;
    cost: number;
    defects: (ReturnType<typeof toJson> & { rank: number })[];
  };
  const sections = new Map<string, PlanSection>();
  // The two reads are not one snapshot: a defect that changed between them (closed, or raised just now) is left
  // out of this answer rather than shown without its place.
  const ranked = rows
    .flatMap((r) => (places.has(r.id) ? [{ r, rank: places.get(r.id)! }] : []))
    .sort((a, b) => a.rank - b.rank);
  for (const { r, rank } of ranked) {
    const key = r.sectionId ?? "none";
    const s = sections.get(key) ?? {
      sectionId: r.sectionId,
      sectionName: r.sectionName ?? "No section",
      effortHours: 0,
      unestimated: 0,
      cost: 0,
      defects: [],
    };
    sections.set(key, s);
    if (r.effortHours === null) s.unestimated += 1;
    s.effortHours += r.effortHours ?? 0;
    s.cost += r.costEstimate ?? 0;
    s.defects.push({ ...toJson(r), rank });
  }
  return { boardId, boardName: board.name, sections: [...sections.values()] };
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
