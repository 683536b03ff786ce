/**
 * Builds a board's return-to-service view: the plan, each stage's gate (src/domain/rts-gate.ts)
 * from the evidence recorded by the readings and defects domains, the log and the breakers'
 * operations against their budgets.
 */
import { defaultOperationsBudget, operationsStatus, OPERATED_KINDS } from "../../src/domain/breaker-operations";
import { localDate, localMinute } from "../../src/domain/local-time";
import { DEFAULT_TEMPLATE, isQualifiedOn } from "../../src/domain/return-to-service";
import {
  evaluateStage,
  GATE_READINGS_PER_PAIR,
  type GateCircuit,
  type GateInput,
  type GateLampObservation,
  type GateLinks,
} from "../../src/domain/rts-gate";
import { watchSchedule } from "../../src/domain/rts-watch";
import type { ComponentKind } from "../../src/domain/vocab";
import { paths } from "../../src/config/paths";
import type {
  EvidenceItem,
  RtsBoardView,
  RtsBreaker,
  RtsEvent,
  RtsSettings,
  RtsSignoff,
  RtsStage,
} from "../../src/schemas/return-to-service";
import { LAMP_LOOK_LABELS, INCIDENT_KIND_LABELS } from "../../src/schemas/return-to-service";
import type { Db } from "../db";
import { notFound } from "../errors";
import * as readings from "../readings/reads";
import { siteTimeZone } from "../sites/reads";
import * as repo from "./repository";

/** Kinds whose circuits take an insulation test before a stage is energised (common practice). */
export const INSULATION_KINDS: ReadonlySet<ComponentKind> = new Set([
  "molded_case_breaker",
  "power_breaker",
  "bus_tie",
  "busbar",
  "switch",
  "fuse",
  "transformer",
  "terminal_strip",
]);

const iso = (d: Date | string | null) =>
  d == null ? null : d instanceof Date ? d.toISOString() : new Date(d).toISOString();

export async function loadSettings(db: Db, siteId: string): Promise<RtsSettings> {
  const row = await repo.getSettings(db, siteId);
  if (!row) return { insulationMaxAgeDays: 7, template: DEFAULT_TEMPLATE, version: 0 };
  return {
    insulationMaxAgeDays: row.insulationMaxAgeDays,
    template: row.template as RtsSettings["template"],
    version: row.version,
  };
}

export function linksFor(siteId: string, boardId: string): GateLinks {
  return {
    circuitReadings: (c: GateCircuit) =>
      c.componentId ? paths.readingsComponent.href(siteId, c.componentId) : paths.readingsBoard.href(siteId, boardId),
    defect: (id) => paths.defect.href(siteId, id),
    crew: () => paths.members.href(siteId),
    stage: (stageId) => paths.rtsBoard.href(siteId, boardId, stageId),
    groundChecks: () => paths.readingsBoard.href(siteId, boardId),
    watch: (stageId) => paths.rtsWatch.href(siteId, boardId, stageId),
  };
}

type Positions = Awaited<ReturnType<typeof repo.listPositions>>;

/** Position ids a stage covers: its sections' positions plus its named circuits. */
export function stagePositionIds(
  stageId: string,
  items: Awaited<ReturnType<typeof repo.listItems>>,
  positions: Positions,
) {
  const mine = items.filter((i) => i.stageId === stageId);
  const sections = new Set(mine.flatMap((i) => (i.sectionId ? [i.sectionId] : [])));
  const ids = new Set(mine.flatMap((i) => (i.positionId ? [i.positionId] : [])));
  for (const p of positions) if (p.sectionId && sections.has(p.sectionId)) ids.add(p.id);
  return positions.filter((p) => ids.has(p.id)).map((p) => p.id);
}

function signoffDto(
  r: Awaited<ReturnType<typeof repo.listSignoffs>>[number],
  all: Awaited<ReturnType<typeof repo.listSignoffs>>,
): RtsSignoff {
  return {
    id: r.id,
    stepId: r.stepId,
    attempt: r.attempt,
    kind: r.kind,
    signedBy: r.signedBy,
    signerName: r.signerName,
    signedAt: iso(r.signedAt)!,
    reason: r.reason,
    note: r.note,
    evidence: (r.evidence ?? []) as EvidenceItem[],
    supersedesId: r.supersedesId,
    supersededBy: all.find((x) => x.supersedesId === r.id)?.id ?? null,
    covers: r.covers,
  };
}

/** The whole board view, evaluated at `now`. */
export async function boardView(db: Db, siteId: string, boardId: string, now: Date): Promise<RtsBoardView> {
  const board = await repo.findBoard(db, siteId, boardId);
  if (!board) throw notFound("That board");
  const stagesOf = repo.listStages(db, boardId);
  const [
    settings,
    stages,
    sections,
    positions,
    qualified,
    insulation,
    thermal,
    latestGround,
    watchChecks,
    incidents,
    energisations,
    operations,
    budgets,
    timeZone,
  ] = await Promise.all([
    loadSettings(db, siteId),
    stagesOf,
    repo.listSections(db, boardId),
    repo.listPositions(db, boardId),
    repo.listQualified(db, siteId),
    // The hold point judges each circuit's newest two readings of each conductor pair, now or as the circuit stood
    // when its stage was energised: only those are read and judged, not a dry-out's thousands.
    stagesOf.then((st) =>
      readings.listInsulation(db, siteId, {
        boardId,
        latestPer: GATE_READINGS_PER_PAIR,
        latestAsOf: [now, ...st.flatMap((s) => (s.energisedAt && s.energisedAt < now ? [s.energisedAt] : []))],
        limit: 10_000,
      }),
    ),
    readings.listThermal(db, siteId, { boardId, limit: 10_000 }),
    readings.latestGroundCheck(db, siteId, boardId),
    repo.listWatchChecks(db, boardId),
    repo.listIncidents(db, boardId),
    repo.listEnergisations(db, boardId),
    repo.listOperations(db, boardId),
    repo.listBudgets(db, siteId),
    siteTimeZone(db, siteId),
  ]);
  const today = localDate(now, timeZone);
  const ids = stages.map((s) => s.id);
  const [items, steps, signoffs] = await Promise.all([
    repo.listItems(db, ids),
    repo.listSteps(db, ids),
    repo.listSignoffs(db, ids),
  ]);
  const links = linksFor(siteId, boardId);
  const posById = new Map(positions.map((p) => [p.id, p]));

  // The board's latest lamp observation: a ground-lamp check from the readings, or a watch check.
  const lampChecks = watchChecks.filter((w) => w.lamps !== "not_seen");
  const lastWatch = lampChecks.at(-1);
  let lamps: GateLampObservation | null = null;
  if (latestGround)
    lamps = {
      id: latestGround.id,
      at: latestGround.measuredAt,
      suggestsGround: latestGround.judgement.verdict !== "meets",
      words: latestGround.judgement.words,
      source: "ground_check",
    };
  if (lastWatch && (!lamps || lastWatch.at.getTime() >= Date.parse(lamps.at)))
    lamps = {
      id: lastWatch.id,
      at: iso(lastWatch.at)!,
      suggestsGround: lastWatch.lamps !== "equal",
      source: "watch_check",
      words:
        lastWatch.lamps === "equal"
          ? "all three lamps equal."
          : `${LAMP_LOOK_LABELS[lastWatch.lamps].toLowerCase()} lamp on phase ${lastWatch.lampPhase ?? "?"} at the watch check of ${localMinute(lastWatch.at, timeZone)} ${timeZone}.`,
    };

  const byComponent = new Map<string, typeof insulation>();
  for (const r of insulation)
    if (r.componentId) byComponent.set(r.componentId, [...(byComponent.get(r.componentId) ?? []), r]);
  const usedBy = new Map<string, number>();
  for (const o of operations) usedBy.set(o.componentId, (usedBy.get(o.componentId) ?? 0) + 1);
  const budgetBy = new Map(budgets.map((b) => [b.componentId, b]));

  const breakers: RtsBreaker[] = positions.flatMap((p) => {
    const kind = (p.componentKind ?? p.kind) as ComponentKind;
    if (!p.componentId || !OPERATED_KINDS.has(kind)) return [];
    const def = defaultOperationsBudget(kind, p.year == null ? null : Number(p.year))!;
    const set = budgetBy.get(p.componentId);
    const budget = set?.budget ?? def.budget;
    return [
      {
        componentId: p.componentId,
        positionId: p.id,
        designation: p.designation,
        kind,
        year: p.year == null ? null : Number(p.year),
        budget,
        budgetBasis: set ? `Set by the curator${set.reason ? `: ${set.reason}` : ""}` : def.basis,
        budgetVersion: set?.version ?? 0,
        status: operationsStatus(usedBy.get(p.componentId) ?? 0, budget),
      },
    ];
  });
  const breakerBy = new Map(breakers.map((b) => [b.positionId, b]));

  const stageDtos: RtsStage[] = [];
  for (const s of stages) {
    const posIds = stagePositionIds(s.id, items, positions);
    const circuits: GateCircuit[] = posIds.map((id) => {
      const p = posById.get(id)!;
      const kind = (p.componentKind ?? p.kind) as ComponentKind;
      return {
        positionId: p.id,
        designation: p.designation,
        circuit: p.circuit,
        componentId: p.componentId,
        needsInsulation: !!p.componentId && INSULATION_KINDS.has(kind),
        readings: (p.componentId ? (byComponent.get(p.componentId) ?? []) : []).map((r) => ({
          id: r.id,
          measuredAt: r.measuredAt,
          conductors: r.conductors,
          verdict: r.judgement.verdict,
          correctedMegohms: r.judgement.correctedMegohms,
        })),
      };
    });
    const defects = await repo.openDefectsOn(db, siteId, posIds);
    const stepRows = steps.filter((x) => x.stageId === s.id);
    const mySignoffs = signoffs.filter((x) => x.stageId === s.id && x.attempt === s.attempt);
    const stepDtos = stepRows.map((st) => {
      const entries = mySignoffs.filter((x) => x.stepId === st.id).map((x) => signoffDto(x, mySignoffs));
      return {
        id: st.id,
        kind: st.kind,
        title: st.title,
        detail: st.detail,
        qualifiedOnly: st.qualifiedOnly,
        sortOrder: st.sortOrder,
        version: st.version,
        entries,
      };
    });
    const qp = s.qualifiedPersonId ? qualified.find((q) => q.userId === s.qualifiedPersonId) : undefined;
    const qualifiedPerson = s.qualifiedPersonId
      ? {
          userId: s.qualifiedPersonId,
          name: qp?.name ?? (await repo.userName(db, s.qualifiedPersonId)),
          qualification: qp?.qualification ?? "",
          expiresOn: qp ? qp.expiresOn : null,
          suspended: !!qp?.suspendedAt,
        }
      : null;
    const dep = s.dependsOnId ? stages.find((x) => x.id === s.dependsOnId) : undefined;
    const energisedAt = iso(s.energisedAt);
    const posSet = new Set(posIds);
    const compSet = new Set(circuits.flatMap((c) => (c.componentId ? [c.componentId] : [])));
    const myChecks = watchChecks.filter((w) => w.stageId === s.id && w.attempt === s.attempt);
    const input: GateInput = {
      stage: {
        id: s.id,
        name: s.name,
        status: s.status,
        supply: s.supply,
        protectionDevice: s.protectionDevice,
        protectionRatingA: s.protectionRatingA,
        protectionLimitA: s.protectionLimitA,
        energisedAt,
        watchHours: s.watchHours,
        checkEveryHours: s.checkEveryHours,
        qualifiedPerson: qp ? qualifiedPerson : null,
        dependsOn: dep ? { id: dep.id, name: dep.name, status: dep.status } : null,
      },
      steps: stepDtos.map((st) => {
        const live = st.entries.filter((e) => !e.supersededBy);
        const cur = live.at(-1) ?? null;
        return {
          id: st.id,
          kind: st.kind,
          title: st.title,
          qualifiedOnly: st.qualifiedOnly,
          current: cur && {
            id: cur.id,
            kind: cur.kind,
            signerName: cur.signerName,
            signedAt: cur.signedAt,
            reason: cur.reason,
            covers: cur.covers,
          },
        };
      }),
      circuits,
      defects: defects.map((d) => ({
        id: d.id,
        ref: Number(d.ref),
        title: d.title,
        designation: d.designation,
        safetyCritical: d.safetyCritical,
        blocksEnergisation: d.blocksEnergisation,
      })),
      lamps,
      watchChecks: myChecks.map((w) => ({ id: w.id, at: iso(w.at)! })),
      thermal: thermal
        .filter((t) => t.componentId && compSet.has(t.componentId))
        .map((t) => ({ id: t.id, at: t.measuredAt, level: t.judgement.level, designation: t.designation ?? "" })),
      incidents: incidents
        .filter((i) => i.stageId === s.id && i.attempt === s.attempt)
        .map((i) => ({ id: i.id, at: iso(i.at)!, summary: i.summary, defectId: i.defectId })),
      maxReadingAgeDays: settings.insulationMaxAgeDays,
      timeZone,
      links,
    };
    const gate = evaluateStage(input, now.toISOString());
    const watch =
      s.status === "energised" && energisedAt
        ? (({ endsAt, nextDueAt, overdueSince, checksDone, complete }) => ({
            endsAt,
            nextDueAt,
            overdueSince,
            checksDone,
            complete,
          }))(
            watchSchedule(
              {
                energisedAt,
                watchHours: s.watchHours,
                checkEveryHours: s.checkEveryHours,
                checks: input.watchChecks.map((c) => c.at),
              },
              now.getTime(),
            ),
          )
        : null;
    const operationWarnings =
      s.status === "planned" || s.status === "de_energised" || s.status === "stopped"
        ? posIds.flatMap((id) => {
            const b = breakerBy.get(id);
            if (!b) return [];
            const st = operationsStatus(b.status.used, b.budget, 1);
            return st.warning ? [{ componentId: b.componentId, designation: b.designation, warning: st.warning }] : [];
          })
        : [];
    stageDtos.push({
      id: s.id,
      boardId: s.boardId,
      sortOrder: s.sortOrder,
      name: s.name,
      sections: items
        .filter((i) => i.stageId === s.id && i.sectionId)
        .map((i) => ({ id: i.sectionId!, name: sections.find((x) => x.id === i.sectionId)?.name ?? "" })),
      positions: items
        .filter((i) => i.stageId === s.id && i.positionId)
        .map((i) => ({
          id: i.positionId!,
          designation: posById.get(i.positionId!)?.designation ?? "",
          circuit: posById.get(i.positionId!)?.circuit ?? "",
        })),
      supply: s.supply,
      protectionDevice: s.protectionDevice,
      protectionRatingA: s.protectionRatingA,
      protectionLimitA: s.protectionLimitA,
      voltageStep: s.voltageStep,
      stepVolts: s.stepVolts,
      dependsOnId: s.dependsOnId,
      qualifiedPerson,
      watchHours: s.watchHours,
      checkEveryHours: s.checkEveryHours,
      status: s.status,
      attempt: s.attempt,
      energisedAt,
      releasedAt: iso(s.releasedAt),
      notes: s.notes,
      version: s.version,
      steps: stepDtos,
      gate,
      watch,
      operationWarnings,
      circuitCount: posSet.size,
    });
  }

  const events: RtsEvent[] = [
    ...energisations.map((e) => ({
      id: e.id,
      stageId: e.stageId,
      stageName: e.stageName ?? "",
      at: iso(e.at)!,
      kind: e.kind,
      by: e.byName,
      title: e.kind === "energise" ? `Energised: ${e.stageName}` : `De-energised: ${e.stageName}`,
      detail: [
        e.volts ? `${e.volts} V` : "",
        e.protectionDevice ? `${e.protectionDevice}${e.protectionRatingA ? ` ${e.protectionRatingA} A` : ""}` : "",
        e.note,
      ]
        .filter(Boolean)
        .join(" · "),
    })),
    ...watchChecks.map((w) => ({
      id: w.id,
      stageId: w.stageId,
      stageName: w.stageName,
      at: iso(w.at)!,
      kind: "watch_check" as const,
      by: w.byName,
      title: `Watch check: ${LAMP_LOOK_LABELS[w.lamps].toLowerCase()}${w.lampPhase && w.lamps !== "equal" ? ` (phase ${w.lampPhase})` : ""}`,
      detail: [
        w.smell && "smell",
        w.sound && "sound",
        w.warmToHand && "warm to the hand",
        w.thermalC != null && `${w.thermalDesignation ?? ""} ${w.thermalC} °C (air ${w.ambientC} °C)`,
        w.note,
      ]
        .filter(Boolean)
        .join(" · "),
      alert: w.lamps === "one_dark" || w.lamps === "one_dim",
      clock: { deviceAt: iso(w.deviceAt), receivedAt: iso(w.createdAt)!, skewS: w.clockSkewS },
    })),
    ...incidents.map((i) => ({
      id: i.id,
      stageId: i.stageId,
      stageName: i.stageName,
      at: iso(i.at)!,
      kind: "incident" as const,
      by: i.byName,
      title: `Incident: ${INCIDENT_KIND_LABELS[i.kind]}`,
      detail: `${i.summary}${i.defectRef ? ` → D-${i.defectRef}` : ""}${i.note ? ` · ${i.note}` : ""}`,
      defectId: i.defectId,
      alert: true,
    })),
    ...signoffs.map((x) => {
      const st = steps.find((y) => y.id === x.stepId);
      const stage = stages.find((y) => y.id === x.stageId);
      const verb =
        x.kind === "released"
          ? "Released with reason"
          : x.kind === "struck"
            ? "Struck out"
            : x.supersedesId
              ? "Signed again"
              : "Signed";
      return {
        id: x.id,
        stageId: x.stageId,
        stageName: stage?.name ?? "",
        at: iso(x.signedAt)!,
        kind: "signoff" as const,
        by: x.signerName,
        title: `${verb}: ${st?.title ?? "hold point"}`,
        detail: [x.reason, x.note].filter(Boolean).join(" · "),
        alert: x.kind === "released",
      };
    }),
    ...operations.map((o) => ({
      id: o.id,
      stageId: o.stageId ?? "",
      stageName: o.stageName ?? "",
      at: iso(o.at)!,
      kind: "operation" as const,
      by: o.byName,
      title: `${o.operation === "close" ? "Closed" : "Opened"} ${o.designation}`,
      detail: o.why,
      componentId: o.componentId,
    })),
  ].sort((a, b) => a.at.localeCompare(b.at));

  return {
    board: { id: board.id, name: board.name, nominalVolts: Number(board.nominalVolts) },
    settings: { insulationMaxAgeDays: settings.insulationMaxAgeDays },
    stages: stageDtos,
    events,
    breakers,
    sections,
    positions: positions.map((p) => ({
      id: p.id,
      designation: p.designation,
      circuit: p.circuit,
      sectionId: p.sectionId,
    })),
    qualifiedPersons: qualified.map((q) => ({
      userId: q.userId,
      name: q.name,
      qualification: q.qualification,
      expiresOn: q.expiresOn,
      current: isQualifiedOn(q, today),
      suspended: !!q.suspendedAt,
    })),
    now: now.toISOString(),
  };
}
