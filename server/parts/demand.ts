/**
 * Demand follows the register: components set to replace/source and open defects whose
 * parts are wanted become links on wanted-list lines, aggregated by specification.
 *
 * It is kept current by the writes, never by a read: the inventory and defects services call
 * `demandChanged` (through server/parts/service.ts) in the transaction that changed a
 * disposition, a nameplate or a defect's parts, and it brings just those sources in line with
 * a fixed number of set-based statements, however many rows the change touched.
 */
import { randomUUID } from "node:crypto";
import { aggregateDemand, normaliseText, type PartSpec } from "../../src/domain/parts";
import { needKey, needMatchesLine } from "../../src/domain/part-workflow";
import { COMPONENT_KINDS, type ComponentKind, type PartStatus } from "../../src/domain/vocab";
import { recordAuditMany, type AuditEntry } from "../audit";
import type { Db } from "../db";
import { refreshBudget } from "./budget-repository";
import * as repo from "./repository";

interface Need {
  source: { componentId: string | null; defectId: string | null };
  spec: PartSpec;
  need: string;
  qty: number;
  positionId: string | null;
  boardId: string | null;
  /** A defect needing the very component that is itself wanted: linked to that line, adds no quantity. */
  ridesWith?: string;
}

type Nameplate = {
  kind: ComponentKind | null;
  ratingAmps: number | null;
  poles: number | null;
  voltageRating: number | null;
  frame: string | null;
  mounting: string | null;
  maker: string | null;
  model: string | null;
};
const pos = (v: number | null) => (v != null && Number.isFinite(v) && v > 0 ? v : null);

/** Register values are not validated like wanted-list input; an odd one (0 A) is treated as blank, never a crash. */
export function specOf(c: Partial<Nameplate>): PartSpec {
  const kind = c.kind && (COMPONENT_KINDS as readonly string[]).includes(c.kind) ? c.kind : "other";
  const poles = pos(c.poles ?? null);
  return {
    kind,
    ratingAmps: pos(c.ratingAmps ?? null),
    poles: poles != null && Number.isInteger(poles) ? poles : null,
    voltageRating: pos(c.voltageRating ?? null),
    frame: c.frame ?? "",
    mounting: c.mounting ?? "",
    maker: c.maker ?? "",
    model: c.model ?? "",
  };
}

export const lineSpec = (
  l: Pick<
    repo.LineRecord,
    "kind" | "ratingAmps" | "poles" | "voltageRating" | "frame" | "mounting" | "maker" | "model" | "mustMatch"
  >,
): PartSpec => ({
  ...specOf(l),
  mustMatch: l.mustMatch ?? undefined,
});

/**
 * What changed: the whole site, or some components and/or defects; `lineIds` names lines whose links
 * went away with their source (a deleted position), so their budget is counted again.
 */
export type DemandScope =
  "site" | { componentIds?: readonly string[]; defectIds?: readonly string[]; lineIds?: readonly string[] };

const sourceId = (s: Need["source"]) => s.componentId ?? s.defectId!;

/**
 * Finds the first line (oldest first) a need may join. Lines are indexed once per distinct
 * must-match list, so matching costs one key per need and list, not one per need and line.
 */
class LineIndex {
  private groups = new Map<
    string,
    { mustMatch: PartSpec["mustMatch"]; byKey: Map<string, Array<{ line: repo.LineRecord; order: number }>> }
  >();
  private n = 0;
  add(line: repo.LineRecord) {
    const spec = lineSpec(line);
    const sig = spec.mustMatch === undefined ? "*" : [...spec.mustMatch].sort().join(",");
    const g = this.groups.get(sig) ?? this.groups.set(sig, { mustMatch: spec.mustMatch, byKey: new Map() }).get(sig)!;
    const key = needKey(spec, line.need);
    g.byKey.set(key, [...(g.byKey.get(key) ?? []), { line, order: this.n++ }]);
  }
  find(n: Need): repo.LineRecord | undefined {
    let best: { line: repo.LineRecord; order: number } | undefined;
    for (const g of this.groups.values()) {
      for (const c of g.byKey.get(needKey({ ...n.spec, mustMatch: g.mustMatch }, n.need)) ?? [])
        if (c.line.status !== "fitted" && (!best || c.order < best.order)) best = c;
    }
    return best?.line;
  }
}

async function collectNeeds(trx: Db, siteId: string, scope: DemandScope): Promise<Need[]> {
  const comps = await repo.wantedComponents(trx, siteId, scope === "site" ? undefined : (scope.componentIds ?? []));
  const needs: Need[] = comps.map((c) => ({
    source: { componentId: c.id, defectId: null },
    spec: specOf(c),
    need: "",
    qty: 1,
    positionId: c.positionId,
    boardId: c.boardId,
  }));
  const defects = await repo.wantedDefects(
    trx,
    siteId,
    scope === "site" ? undefined : { ids: scope.defectIds ?? [], componentIds: scope.componentIds ?? [] },
  );
  for (const d of defects) {
    const need = d.partsNeeded.trim();
    const ridesWith = !need && d.componentId && d.componentWanted ? d.componentId : undefined;
    needs.push({
      source: { componentId: null, defectId: d.id },
      spec: specOf(d),
      need,
      qty: ridesWith ? 0 : 1,
      positionId: d.positionId,
      boardId: d.boardId,
      ridesWith,
    });
  }
  return needs;
}

type Withdrawal = { link: repo.LinkRecord; why: string };
type Attachment = { line: repo.LineRecord; need: Need; note: boolean };
const CHUNK = 1000;
async function chunked<T>(rows: T[], write: (part: T[]) => Promise<unknown>) {
  for (let i = 0; i < rows.length; i += CHUNK) await write(rows.slice(i, i + CHUNK));
}

/**
 * Brings the wanted list in line with the register for the sources in `scope`, inside the
 * caller's transaction: keeps links whose source still wants the same spec, moves or withdraws
 * the rest (fitted links are history and never touched), joins new needs to a matching open line
 * (reopening one this function closed), creates lines for the remaining specs via
 * aggregateDemand, and closes register lines left with no demand while nobody has bought
 * anything for them. The statements are set-based: their number does not grow with the rows.
 */
export async function syncDemand(
  trx: Db,
  siteId: string,
  scope: DemandScope,
  actorId: string | null = null,
): Promise<{ created: number; linked: number; withdrawn: number }> {
  if (scope !== "site" && !scope.componentIds?.length && !scope.defectIds?.length) {
    await refreshBudget(trx, siteId, scope.lineIds ?? []);
    return { created: 0, linked: 0, withdrawn: 0 };
  }
  await repo.lockSiteParts(trx, siteId);
  const needs = await collectNeeds(trx, siteId, scope);
  const rideTargets = [...new Set(needs.flatMap((n) => (n.ridesWith ? [n.ridesWith] : [])))];
  const links = await repo.linksOfSources(
    trx,
    siteId,
    scope === "site"
      ? undefined
      : {
          componentIds: [...new Set([...(scope.componentIds ?? []), ...rideTargets])],
          defectIds: [
            ...new Set([
              ...(scope.defectIds ?? []),
              ...needs.flatMap((n) => (n.source.defectId ? [n.source.defectId] : [])),
            ]),
          ],
        },
  );
  const lines = await repo.joinableLines(trx, siteId);
  const index = new LineIndex();
  lines.forEach((l) => index.add(l));
  const allLines = new Map(lines.map((l) => [l.id, l]));
  for (const l of await repo.linesByIds(
    trx,
    siteId,
    [...new Set(links.map((l) => l.lineId))].filter((id) => !allLines.has(id)),
  ))
    allLines.set(l.id, l);

  const bySource = new Map<string, repo.LinkRecord[]>();
  for (const l of links) {
    const mine = bySource.get(l.componentId ?? l.defectId!);
    if (mine) mine.push(l);
    else bySource.set(l.componentId ?? l.defectId!, [l]);
  }
  const wantedIds = new Set(needs.map((n) => sourceId(n.source)));
  const processed = new Set(needs.filter((n) => n.source.componentId).map((n) => n.source.componentId!));
  // A defect riding on a component outside this change follows that component's current line.
  const lineOfComponent = new Map<string, string>();
  for (const id of rideTargets) {
    if (processed.has(id)) continue;
    const mine = bySource.get(id) ?? [];
    const active = mine.find((l) => l.active);
    if (active && !mine.some((l) => l.fitted)) lineOfComponent.set(id, active.lineId);
  }
  const withdrawals: Withdrawal[] = [];
  const attachments: Attachment[] = [];
  const newLines: Array<{ line: repo.LineRecord; spec: PartSpec }> = [];
  const pending: Need[] = [];

  for (const n of needs.filter((x) => !x.ridesWith)) {
    const mine = bySource.get(sourceId(n.source)) ?? [];
    if (mine.some((l) => l.fitted)) continue; // satisfied: the part was fitted, the list keeps it as history
    const keep = mine.find((l) => {
      const line = l.active && allLines.get(l.lineId);
      return line && needMatchesLine(n, { spec: lineSpec(line), need: line.need });
    });
    for (const l of mine) if (l.active && l !== keep) withdrawals.push({ link: l, why: "its specification changed" });
    if (keep) {
      if (n.source.componentId) lineOfComponent.set(n.source.componentId, keep.lineId);
      continue;
    }
    const target = index.find(n);
    if (target) {
      attachments.push({ line: target, need: n, note: true });
      if (n.source.componentId) lineOfComponent.set(n.source.componentId, target.id);
    } else pending.push(n);
  }

  for (const group of groupByNeed(pending)) {
    // Each need's key once (NFKC over every field is the costly part): the whole-site sync of a
    // 20,000-position site spent minutes recomputing it per new line and need.
    const byKey = new Map<string, Need[]>();
    for (const n of group) {
      const k = needKey(n.spec);
      const same = byKey.get(k);
      if (same) same.push(n);
      else byKey.set(k, [n]);
    }
    for (const d of aggregateDemand(
      group.map((n) => ({ spec: n.spec, qty: n.qty, positionId: n.positionId ?? undefined })),
    )) {
      const line = newRegisterLine(siteId, d.spec, group[0].need, actorId);
      newLines.push({ line, spec: d.spec });
      index.add(line);
      for (const n of byKey.get(needKey(d.spec)) ?? []) {
        attachments.push({ line, need: n, note: false });
        if (n.source.componentId) lineOfComponent.set(n.source.componentId, line.id);
      }
    }
  }

  const newLineById = new Map(newLines.map((x) => [x.line.id, x.line]));
  for (const n of needs.filter((x) => x.ridesWith)) {
    const lineId = lineOfComponent.get(n.ridesWith!);
    const mine = bySource.get(sourceId(n.source)) ?? [];
    if (!lineId || mine.some((l) => l.fitted)) continue;
    if (mine.some((l) => l.active && l.lineId === lineId)) continue;
    for (const l of mine) if (l.active) withdrawals.push({ link: l, why: "it now goes with its component" });
    const line = allLines.get(lineId) ?? newLineById.get(lineId);
    if (line) attachments.push({ line, need: n, note: true });
  }

  const scopeComponents = new Set(scope === "site" ? [] : (scope.componentIds ?? []));
  const scopeDefects = new Set(scope === "site" ? [] : (scope.defectIds ?? []));
  const inScope = (l: repo.LinkRecord) =>
    scope === "site" || (l.componentId ? scopeComponents.has(l.componentId) : scopeDefects.has(l.defectId!));
  for (const l of links)
    if (l.active && !l.fitted && inScope(l) && !wantedIds.has(l.componentId ?? l.defectId!))
      withdrawals.push({ link: l, why: "its source no longer asks for a part" });

  const closed = await write(trx, siteId, actorId, {
    withdrawals,
    attachments,
    newLines: newLines.map((x) => x.line),
    // A line can be left empty only by this sync's withdrawals, or by links that went with their source
    // (scope.lineIds); the whole site's sync looks at every line.
    mayEmpty: scope === "site" ? null : [...withdrawals.map((w) => w.link.lineId), ...(scope.lineIds ?? [])],
  });
  // Every line whose links, status or quantity moved (new lines too) has its budget counted again, last.
  await refreshBudget(trx, siteId, [
    ...withdrawals.map((w) => w.link.lineId),
    ...attachments.map((a) => a.line.id),
    ...closed,
    ...(scope === "site" ? [] : (scope.lineIds ?? [])),
  ]);
  return {
    created: newLines.length,
    linked: attachments.filter((a) => a.note).length - attachments.filter((a) => a.note && a.need.ridesWith).length,
    withdrawn: withdrawals.length,
  };
}

/** Every demand on the site, e.g. after a line's spec changed or to rebuild the list; the same statements as demandChanged. */
export const reconcileDemand = (trx: Db, siteId: string, actorId: string | null = null) =>
  syncDemand(trx, siteId, "site", actorId);

function groupByNeed(needs: Need[]): Need[][] {
  const groups = new Map<string, Need[]>();
  for (const n of needs) {
    const k = normaliseText(n.need);
    const g = groups.get(k);
    if (g) g.push(n);
    else groups.set(k, [n]);
  }
  return [...groups.values()];
}

function newRegisterLine(siteId: string, spec: PartSpec, need: string, actorId: string | null): repo.LineRecord {
  const s = specOf(spec);
  const now = new Date();
  return {
    id: randomUUID(),
    number: 0, // given by the database's trigger on insert (left out of the INSERT below)
    siteId,
    version: 1,
    origin: "register",
    kind: s.kind,
    ratingAmps: s.ratingAmps ?? null,
    poles: s.poles ?? null,
    voltageRating: s.voltageRating ?? null,
    frame: s.frame ?? "",
    mounting: s.mounting ?? "",
    maker: s.maker ?? "",
    model: s.model ?? "",
    need,
    notes: "",
    cancelReason: "",
    mustMatch: null,
    specKey: needKey(s, need),
    heritageRule: "original_only",
    status: "wanted",
    autoCancelled: false,
    manualQty: 0,
    estimatedUnitCost: null,
    fittedAt: null,
    createdAt: now,
    updatedAt: now,
    createdBy: actorId,
  } as repo.LineRecord;
}

type History = {
  siteId: string;
  lineId: string;
  action: string;
  summary: string;
  fromStatus?: PartStatus | null;
  toStatus?: PartStatus | null;
  actorId: string | null;
};

/**
 * Writes what syncDemand decided: a fixed number of statements (chunked only past 1,000 rows).
 * Returns the lines it closed for want of demand.
 */
async function write(
  trx: Db,
  siteId: string,
  actorId: string | null,
  plan: {
    withdrawals: Withdrawal[];
    attachments: Attachment[];
    newLines: repo.LineRecord[];
    mayEmpty: string[] | null;
  },
) {
  const history: History[] = [];
  const audit: AuditEntry[] = [];
  if (plan.withdrawals.length) {
    const ids = [...new Set(plan.withdrawals.map((w) => w.link.id))];
    await chunked(ids, (part) => repo.withdrawLinks(trx, part));
    for (const { link: l, why } of plan.withdrawals) {
      history.push({
        siteId,
        lineId: l.lineId,
        action: "demand_withdrawn",
        summary: `A position no longer needs it: ${why}`,
        actorId,
      });
      audit.push({
        siteId,
        entityType: "part_demand_link",
        entityId: l.id,
        action: "withdraw",
        actorId,
        positionId: l.positionId,
        boardId: l.boardId,
        before: { active: true },
        after: { active: false },
      });
    }
  }
  if (plan.newLines.length) {
    await chunked(plan.newLines, (part) =>
      repo.insertLines(
        trx,
        part.map(
          ({
            number: _n,
            version: _v,
            status: _s,
            autoCancelled: _a,
            manualQty: _m,
            heritageRule: _h,
            createdAt: _c,
            updatedAt: _u,
            ...l
          }) => l,
        ),
      ),
    );
    for (const line of plan.newLines) {
      history.push({
        siteId,
        lineId: line.id,
        action: "created",
        summary: "Added from the register",
        toStatus: "wanted",
        actorId,
      });
      audit.push({ siteId, entityType: "part_line", entityId: line.id, action: "create", actorId, after: line });
    }
  }
  if (plan.attachments.length) {
    const rows = plan.attachments.map((a) => ({
      id: randomUUID(),
      siteId,
      lineId: a.line.id,
      componentId: a.need.source.componentId,
      defectId: a.need.source.defectId,
      positionId: a.need.positionId,
      boardId: a.need.boardId,
      qty: a.need.qty,
    }));
    await chunked(rows, (part) => repo.insertLinks(trx, part));
    // Lines this function closed come back when demand returns: to "lead found" when a live lead exists.
    const reopen = [
      ...new Set(
        plan.attachments.filter((a) => a.line.status === "cancelled" && a.line.autoCancelled).map((a) => a.line.id),
      ),
    ];
    const reopened = reopen.length ? await repo.reopenAutoCancelled(trx, reopen) : [];
    for (const r of reopened) {
      history.push({
        siteId,
        lineId: r.id,
        action: "reopened",
        summary: "Wanted again by the register",
        fromStatus: "cancelled",
        toStatus: r.status,
        actorId,
      });
      const line = plan.attachments.find((a) => a.line.id === r.id)!.line;
      Object.assign(line, { status: r.status, autoCancelled: false, cancelReason: "" });
    }
    plan.attachments.forEach((a, i) => {
      if (a.note)
        history.push({
          siteId,
          lineId: a.line.id,
          action: "demand_added",
          summary: a.need.source.defectId ? "A defect asks for it" : "A component set to replace or source",
          actorId,
        });
      audit.push({
        siteId,
        entityType: "part_demand_link",
        entityId: rows[i].id,
        action: "create",
        actorId,
        positionId: a.need.positionId,
        boardId: a.need.boardId,
        after: { lineId: a.line.id, ...a.need.source },
      });
    });
  }
  // Register lines still at wanted / lead found with no demand left close themselves; bought parts stay (as spares).
  const closed = await repo.cancelEmptyRegisterLines(trx, siteId, plan.mayEmpty);
  for (const l of closed) {
    history.push({
      siteId,
      lineId: l.id,
      action: "auto_cancelled",
      summary: "Closed: nothing on the register asks for it any more",
      fromStatus: l.fromStatus,
      toStatus: "cancelled",
      actorId,
    });
    audit.push({
      siteId,
      entityType: "part_line",
      entityId: l.id,
      action: "auto_cancel",
      actorId,
      before: { status: l.fromStatus },
      after: { status: "cancelled" },
    });
  }
  await chunked(history, (part) => repo.insertHistoryRows(trx, part));
  await recordAuditMany(trx, audit);
  return closed.map((l) => l.id);
}
