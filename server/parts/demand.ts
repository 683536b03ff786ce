/**
 * Demand follows the register: components set to replace/source and open defects whose
 * parts are wanted become links on wanted-list lines, aggregated by specification.
 */
import { sql } from "kysely";
import { aggregateDemand, normaliseText, type PartSpec } from "../../src/domain/parts";
import { needKey, needMatchesLine } from "../../src/domain/part-workflow";
import { COMPONENT_KINDS, type ComponentKind } from "../../src/domain/vocab";
import { recordAudit } from "../audit";
import type { Db } from "../db";
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

type Nameplate = { kind: ComponentKind | null; ratingAmps: number | null; poles: number | null; voltageRating: number | null; frame: string | null; mounting: string | null; maker: string | null; model: string | null };
const pos = (v: number | null) => (v != null && Number.isFinite(v) && v > 0 ? v : null);

/** Register values are not validated like wanted-list input; an odd one (0 A) is treated as blank, never a crash. */
export function specOf(c: Partial<Nameplate>): PartSpec {
  const kind = c.kind && (COMPONENT_KINDS as readonly string[]).includes(c.kind) ? c.kind : "other";
  const poles = pos(c.poles ?? null);
  return {
    kind, ratingAmps: pos(c.ratingAmps ?? null), poles: poles != null && Number.isInteger(poles) ? poles : null, voltageRating: pos(c.voltageRating ?? null),
    frame: c.frame ?? "", mounting: c.mounting ?? "", maker: c.maker ?? "", model: c.model ?? "",
  };
}

export const lineSpec = (l: Pick<repo.LineRecord, "kind" | "ratingAmps" | "poles" | "voltageRating" | "frame" | "mounting" | "maker" | "model" | "mustMatch">): PartSpec => ({
  ...specOf(l), mustMatch: l.mustMatch ?? undefined,
});

async function collectNeeds(trx: Db, siteId: string): Promise<Need[]> {
  const comps = await repo.wantedComponents(trx, siteId);
  const needs: Need[] = comps.map((c) => ({
    source: { componentId: c.id, defectId: null }, spec: specOf(c), need: "", qty: 1, positionId: c.positionId, boardId: c.boardId,
  }));
  const wanted = new Set(comps.map((c) => c.id));
  for (const d of await repo.wantedDefects(trx, siteId)) {
    const need = d.partsNeeded.trim();
    const ridesWith = !need && d.componentId && wanted.has(d.componentId) ? d.componentId : undefined;
    needs.push({ source: { componentId: null, defectId: d.id }, spec: specOf(d), need, qty: ridesWith ? 0 : 1, positionId: d.positionId, boardId: d.boardId, ridesWith });
  }
  return needs;
}

const sourceId = (s: Need["source"]) => s.componentId ?? s.defectId!;

/**
 * Brings the site's wanted list in line with the register, inside the caller's transaction:
 * keeps links whose source still wants the same spec, moves or withdraws the rest (fitted links
 * are history and never touched), joins new needs to a matching open line (reopening one this
 * function closed), creates lines for the remaining specs via aggregateDemand, and closes
 * register lines left with no demand while nobody has bought anything for them.
 * Call it after changing dispositions or defects' parts state; the list calls it on every read.
 */
export async function reconcileDemand(trx: Db, siteId: string, actorId: string | null = null): Promise<{ created: number; linked: number; withdrawn: number }> {
  await repo.lockSiteParts(trx, siteId);
  const needs = await collectNeeds(trx, siteId);
  const links = await repo.linksOfSite(trx, siteId);
  const lines = await repo.joinableLines(trx, siteId);
  const allLines = new Map((await repo.linesByIds(trx, siteId, [...new Set(links.map((l) => l.lineId))])).map((l) => [l.id, l]));
  for (const l of lines) allLines.set(l.id, l);
  const stats = { created: 0, linked: 0, withdrawn: 0 };
  const bySource = new Map<string, typeof links>();
  for (const l of links) bySource.set(l.componentId ?? l.defectId!, [...(bySource.get(l.componentId ?? l.defectId!) ?? []), l]);
  const wantedIds = new Set(needs.map((n) => sourceId(n.source)));
  const lineOfComponent = new Map<string, string>();
  const pending: Need[] = [];

  for (const n of needs.filter((x) => !x.ridesWith)) {
    const mine = bySource.get(sourceId(n.source)) ?? [];
    const fitted = mine.find((l) => l.fitted);
    if (fitted) continue; // satisfied: the part was fitted, the list keeps it as history
    const keep = mine.find((l) => l.active && (() => { const line = allLines.get(l.lineId); return line && needMatchesLine(n, { spec: lineSpec(line), need: line.need }); })());
    for (const l of mine) if (l.active && l !== keep) stats.withdrawn += await withdraw(trx, siteId, l, actorId, "its specification changed");
    if (keep) { if (n.source.componentId) lineOfComponent.set(n.source.componentId, keep.lineId); continue; }
    const target = lines.find((line) => line.status !== "fitted" && needMatchesLine(n, { spec: lineSpec(line), need: line.need }));
    if (target) {
      await attach(trx, siteId, target, n, actorId);
      stats.linked += 1;
      if (n.source.componentId) lineOfComponent.set(n.source.componentId, target.id);
    } else pending.push(n);
  }

  for (const group of groupByNeed(pending)) {
    for (const d of aggregateDemand(group.map((n) => ({ spec: n.spec, qty: n.qty, positionId: n.positionId ?? undefined })))) {
      const line = await createRegisterLine(trx, siteId, d.spec, group[0].need, actorId);
      lines.push(line);
      stats.created += 1;
      for (const n of group.filter((x) => needKey(x.spec) === needKey(d.spec))) {
        await attach(trx, siteId, line, n, actorId, false);
        if (n.source.componentId) lineOfComponent.set(n.source.componentId, line.id);
      }
    }
  }

  for (const n of needs.filter((x) => x.ridesWith)) {
    const lineId = lineOfComponent.get(n.ridesWith!);
    const mine = bySource.get(sourceId(n.source)) ?? [];
    if (!lineId || mine.some((l) => l.fitted)) continue;
    if (mine.some((l) => l.active && l.lineId === lineId)) continue;
    for (const l of mine) if (l.active) stats.withdrawn += await withdraw(trx, siteId, l, actorId, "it now goes with its component");
    await attach(trx, siteId, lines.find((l) => l.id === lineId)!, n, actorId);
  }

  for (const l of links) if (l.active && !l.fitted && !wantedIds.has(l.componentId ?? l.defectId!)) stats.withdrawn += await withdraw(trx, siteId, l, actorId, "its source no longer asks for a part");
  await closeEmptyLines(trx, siteId, actorId);
  return stats;
}

function groupByNeed(needs: Need[]): Need[][] {
  const groups = new Map<string, Need[]>();
  for (const n of needs) groups.set(normaliseText(n.need), [...(groups.get(normaliseText(n.need)) ?? []), n]);
  return [...groups.values()];
}

async function createRegisterLine(trx: Db, siteId: string, spec: PartSpec, need: string, actorId: string | null) {
  const s = specOf(spec);
  const line = await repo.insertLine(trx, {
    siteId, origin: "register", kind: s.kind, ratingAmps: s.ratingAmps ?? null, poles: s.poles ?? null, voltageRating: s.voltageRating ?? null,
    frame: s.frame ?? "", mounting: s.mounting ?? "", maker: s.maker ?? "", model: s.model ?? "", need, specKey: needKey(s, need), createdBy: actorId,
  });
  await repo.addHistory(trx, { siteId, lineId: line.id, action: "created", summary: "Added from the register", toStatus: "wanted", actorId });
  await recordAudit(trx, { siteId, entityType: "part_line", entityId: line.id, action: "create", actorId, after: line });
  return line;
}

async function attach(trx: Db, siteId: string, line: repo.LineRecord, n: Need, actorId: string | null, note = true) {
  const link = await trx.insertInto("partDemandLinks")
    .values({ siteId, lineId: line.id, componentId: n.source.componentId, defectId: n.source.defectId, positionId: n.positionId, boardId: n.boardId, qty: n.qty })
    .returning(["id"]).executeTakeFirstOrThrow();
  if (line.status === "cancelled" && line.autoCancelled) {
    const leads = await trx.selectFrom("partLeads").select("id").where("lineId", "=", line.id).where("status", "!=", "dead").execute();
    const to = leads.length ? "lead_found" : "wanted";
    Object.assign(line, await repo.updateLine(trx, line.id, { status: to, autoCancelled: false, cancelReason: "" }));
    await repo.addHistory(trx, { siteId, lineId: line.id, action: "reopened", summary: "Wanted again by the register", fromStatus: "cancelled", toStatus: to, actorId });
  }
  if (note) await repo.addHistory(trx, { siteId, lineId: line.id, action: "demand_added", summary: n.source.defectId ? "A defect asks for it" : "A component set to replace or source", actorId });
  await recordAudit(trx, { siteId, entityType: "part_demand_link", entityId: link.id, action: "create", actorId, positionId: n.positionId, boardId: n.boardId, after: { lineId: line.id, ...n.source } });
}

async function withdraw(trx: Db, siteId: string, l: { id: string; lineId: string; positionId: string | null; boardId: string | null }, actorId: string | null, why: string) {
  await trx.updateTable("partDemandLinks").set({ active: false, withdrawnAt: sql`now()` }).where("id", "=", l.id).execute();
  await repo.addHistory(trx, { siteId, lineId: l.lineId, action: "demand_withdrawn", summary: `A position no longer needs it: ${why}`, actorId });
  await recordAudit(trx, { siteId, entityType: "part_demand_link", entityId: l.id, action: "withdraw", actorId, positionId: l.positionId, boardId: l.boardId, before: { active: true }, after: { active: false } });
  return 1;
}

/** Register lines still at wanted / lead found with no demand left close themselves; bought parts stay (as spares). */
async function closeEmptyLines(trx: Db, siteId: string, actorId: string | null) {
  const empty = await trx.selectFrom("partLines as pl").select(["pl.id", "pl.status"])
    .where("pl.siteId", "=", siteId).where("pl.origin", "=", "register").where("pl.manualQty", "=", 0).where("pl.status", "in", ["wanted", "lead_found"])
    .where((eb) => eb.not(eb.exists(eb.selectFrom("partDemandLinks as l").select("l.id").whereRef("l.lineId", "=", "pl.id").where("l.active", "=", true))))
    .execute();
  for (const l of empty) {
    await repo.updateLine(trx, l.id, { status: "cancelled", autoCancelled: true, cancelReason: "No longer wanted: nothing on the register asks for it." });
    await repo.addHistory(trx, { siteId, lineId: l.id, action: "auto_cancelled", summary: "Closed: nothing on the register asks for it any more", fromStatus: l.status, toStatus: "cancelled", actorId });
    await recordAudit(trx, { siteId, entityType: "part_line", entityId: l.id, action: "auto_cancel", actorId, before: { status: l.status }, after: { status: "cancelled" } });
  }
}
