/**
 * Called by the readings domain inside its own transaction when a reading is recorded
 *: a thermal level 3–4 or an insulation reading below the minimum on a
 * position of a stage that is live under return to service opens an incident — a
 * safety-critical, energisation-blocking defect — and stops the stage. Readings on boards
 * or stages not yet energised are left to the gate, which already blocks on them (a
 * dry-out produces many low readings; each is not an incident).
 */
import type { Role } from "../../src/domain/vocab";
import type { Db } from "../db";
import * as repo from "./repository";
import { openIncident } from "./service";
import { stagePositionIds } from "./view";

export interface RecordedReading {
  kind: "thermal_scan" | "insulation_reading";
  id: string;
  boardId: string;
  componentId: string | null;
  measuredAt: Date;
  /** Thermal: NETA level 0–4. */
  level?: number;
  /** Insulation: the verdict against the recorded criterion. */
  verdict?: "meets" | "below_minimum" | "investigate" | "not_valid";
  designation?: string | null;
  words: string;
}

/** Returns the incidents opened (empty when the reading is not one that stops a stage). */
export async function onReadingRecorded(trx: Db, siteId: string, actorId: string, r: RecordedReading) {
  const role = ((await repo.memberRole(trx, siteId, actorId))?.role ?? "admin") as Role | "admin";
  const ctx = { siteId, actor: { id: actorId, role } };
  const trips = r.kind === "thermal_scan" ? (r.level ?? 0) >= 3 : r.verdict === "below_minimum";
  if (!trips || !r.componentId) return [];
  const c = await repo.findComponent(trx, ctx.siteId, r.componentId);
  if (!c) return [];
  const stages = (await repo.listStages(trx, r.boardId)).filter((s) => s.status === "energised");
  if (!stages.length) return [];
  const [items, positions] = await Promise.all([
    repo.listItems(
      trx,
      stages.map((s) => s.id),
    ),
    repo.listPositions(trx, r.boardId),
  ]);
  const out = [];
  for (const s of stages) {
    if (!stagePositionIds(s.id, items, positions).includes(c.positionId)) continue;
    const locked = (await repo.lockStage(trx, ctx.siteId, s.id))!;
    if (locked.status !== "energised") continue;
    const summary =
      r.kind === "thermal_scan"
        ? `Thermal level ${r.level} on ${c.designation} while “${s.name}” is live`
        : `Insulation below the minimum on ${c.designation} while “${s.name}” is live`;
    const { incident, defect } = await openIncident(trx, ctx, locked, {
      kind: r.kind === "thermal_scan" ? "hot_spot" : "low_insulation",
      positionId: c.positionId,
      at: r.measuredAt,
      summary,
      note: r.words,
      readingKind: r.kind,
      readingId: r.id,
    });
    out.push({ incidentId: incident.id, defectId: defect.id, defectRef: defect.ref });
  }
  return out;
}
