import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api } from "../../lib/api-client";
import { submitOrQueue } from "../../lib/outbox";
import { readingKeys } from "./keys";
import {
  boardReadingsSchema,
  componentReadingsSchema,
  contactReadingSchema,
  criteriaSchema,
  groundCheckSchema,
  groundHuntStepSchema,
  insulationReadingSchema,
  stepVoltageSchema,
  tripTestSchema,
  overrideSchema,
  phaseComparisonKey,
  readingTargetsSchema,
  seriesReadingsSchema,
  thermalScanSchema,
  type BoardReadings,
  type ComponentReadings,
  type ContactReadingBody,
  type DryOutSeries,
  type CriteriaBody,
  type GroundCheckBody,
  type GroundHuntBody,
  type InsulationReadingBody,
  type StepVoltageBody,
  type TripTestBody,
  type OverrideBody,
  type ThermalScanBody,
} from "../../schemas/readings";

const site = (siteId: string) => `/api/sites/${siteId}`;

export const targetsQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: readingKeys.targets(siteId),
    queryFn: ({ signal }) =>
      api.get(`${site(siteId)}/readings/targets`, readingTargetsSchema, signal).then((d) => d.boards),
  });
export const criteriaQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: readingKeys.criteria(siteId),
    queryFn: ({ signal }) =>
      api
        .get(`${site(siteId)}/readings/criteria`, z.object({ criteria: criteriaSchema }), signal)
        .then((d) => d.criteria),
  });
export const boardReadingsQueryOptions = (siteId: string, boardId: string) =>
  queryOptions({
    queryKey: readingKeys.board(siteId, boardId),
    queryFn: ({ signal }) => api.get(`${site(siteId)}/boards/${boardId}/readings`, boardReadingsSchema, signal),
    select: withSeries,
  });

/**
 * A phone's kept copy of a board's readings from before 2026-12-05 has no totals, series or component list
 * (kept reads are not parsed again): they are made from the lists it has, as the page made them then, until
 * the server answers again. A copy with them passes through unchanged.
 */
export function withSeries(d: BoardReadings): BoardReadings {
  const kept = d as Partial<BoardReadings> & Omit<BoardReadings, "totals" | "dryOutSeries" | "componentsWithReadings">;
  if (kept.totals && kept.dryOutSeries && kept.componentsWithReadings) return d;
  const series = new Map<string, DryOutSeries>();
  for (const r of d.insulation) {
    const key = phaseComparisonKey(r);
    const s = series.get(key);
    if (s) {
      s.count++;
      if (!s.conductors.includes(r.conductors)) s.conductors.push(r.conductors);
    } else
      series.set(key, {
        componentId: r.componentId ?? null,
        designation: r.designation ?? null,
        circuit: r.circuit,
        conductors: [r.conductors],
        count: 1,
        latestAt: r.measuredAt,
      });
  }
  const components = new Map<string, string>();
  for (const r of [...d.insulation, ...d.contacts, ...d.thermal, ...d.tripTests, ...d.stepTests])
    if (r.componentId && !components.has(r.componentId)) components.set(r.componentId, r.designation ?? "");
  return {
    ...d,
    totals: kept.totals ?? {
      insulation: d.insulation.length,
      contacts: d.contacts.length,
      thermal: d.thermal.length,
      groundChecks: d.groundChecks.length,
      tripTests: d.tripTests.length,
      stepTests: d.stepTests.length,
    },
    dryOutSeries: kept.dryOutSeries ?? [...series.values()],
    componentsWithReadings:
      kept.componentsWithReadings ??
      [...components].map(([componentId, designation]) => ({ componentId, designation })),
  };
}
export const componentReadingsQueryOptions = (siteId: string, componentId: string) =>
  queryOptions({
    queryKey: readingKeys.component(siteId, componentId),
    queryFn: ({ signal }) =>
      api.get(`${site(siteId)}/components/${componentId}/readings`, componentReadingsSchema, signal),
    // A phone's kept copy from before 2026-12-05 has no totals: it counts what it lists.
    select: (d: ComponentReadings): ComponentReadings =>
      (d as Partial<ComponentReadings>).totals
        ? d
        : {
            ...d,
            totals: {
              insulation: d.insulation.length,
              contacts: d.contacts.length,
              thermal: d.thermal.length,
              groundChecks: 0,
              tripTests: d.tripTests.length,
              stepTests: d.stepTests.length,
            },
          },
  });

/** One insulation series of a board, whole: a component's, or a circuit's named by hand. */
export const dryOutQueryOptions = (
  siteId: string,
  boardId: string,
  of: { componentId: string } | { circuit: string },
) =>
  queryOptions({
    queryKey: readingKeys.dryOut(
      siteId,
      boardId,
      "componentId" in of ? `c:${of.componentId}` : `circuit:${of.circuit}`,
    ),
    queryFn: ({ signal }) =>
      api.get(`${site(siteId)}/boards/${boardId}/dry-out?${new URLSearchParams(of)}`, seriesReadingsSchema, signal),
  });

export const useReadingTargets = (siteId: string) => useQuery(targetsQueryOptions(siteId));
export const useCriteria = (siteId: string) => useQuery(criteriaQueryOptions(siteId));
export const useBoardReadings = (siteId: string, boardId: string) =>
  useQuery(boardReadingsQueryOptions(siteId, boardId));
export const useDryOutSeries = (
  siteId: string,
  boardId: string,
  of: { componentId: string } | { circuit: string } | null,
) => useQuery({ ...dryOutQueryOptions(siteId, boardId, of ?? { circuit: "" }), enabled: of !== null });
export const useComponentReadings = (siteId: string, componentId: string) =>
  useQuery(componentReadingsQueryOptions(siteId, componentId));

/** Every write re-reads the site's readings: verdicts depend on criteria and on each other. */
function useSiteMutation<B, R>(siteId: string, fn: (b: B) => Promise<R>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => qc.invalidateQueries({ queryKey: readingKeys.all(siteId) }) });
}

/**
 * Readings from the phone: online they are saved at once as before; with no signal they
 * wait in the phone's outbox (src/lib/outbox) and `{queued: true}` comes back — the verdict is the
 * server's, so it shows once the reading is there. `label` names the reading in the outbox's list.
 */
export const useRecordInsulation = (siteId: string, boardId: string) =>
  useSiteMutation(siteId, ({ label, ...b }: InsulationReadingBody & { label: string }) =>
    submitOrQueue({
      siteId,
      kind: "insulation",
      label: `Insulation reading, ${label}`,
      url: `${site(siteId)}/boards/${boardId}/insulation-readings`,
      body: b,
      parse: (d) => z.object({ reading: insulationReadingSchema }).parse(d).reading,
    }),
  );
export const useRecordContact = (siteId: string) =>
  useSiteMutation(siteId, ({ componentId, label, ...b }: ContactReadingBody & { componentId: string; label: string }) =>
    submitOrQueue({
      siteId,
      kind: "contact",
      label: `Contact resistance, ${label}`,
      url: `${site(siteId)}/components/${componentId}/contact-readings`,
      body: b,
      parse: (d) => z.object({ reading: contactReadingSchema }).parse(d).reading,
    }),
  );
export const useRecordThermal = (siteId: string) =>
  useSiteMutation(siteId, ({ componentId, label, ...b }: ThermalScanBody & { componentId: string; label: string }) =>
    submitOrQueue({
      siteId,
      kind: "thermal",
      label: `Thermal scan, ${label}`,
      url: `${site(siteId)}/components/${componentId}/thermal-scans`,
      body: b,
      parse: (d) => z.object({ scan: thermalScanSchema }).parse(d).scan,
    }),
  );
export const useRecordGroundCheck = (siteId: string, boardId: string) =>
  useSiteMutation(siteId, ({ label, ...b }: GroundCheckBody & { label: string }) =>
    submitOrQueue({
      siteId,
      kind: "ground",
      label: `Ground-lamp check, ${label}`,
      url: `${site(siteId)}/boards/${boardId}/ground-checks`,
      body: b,
      parse: (d) => z.object({ check: groundCheckSchema }).parse(d).check,
    }),
  );
export const useSaveCriteria = (siteId: string) =>
  useSiteMutation(siteId, (b: CriteriaBody) =>
    api
      .send("PUT", `${site(siteId)}/readings/criteria`, b, z.object({ criteria: criteriaSchema }))
      .then((d) => d.criteria),
  );
export const useSaveOverride = (siteId: string, componentId: string) =>
  useSiteMutation(siteId, (b: OverrideBody) =>
    api
      .send(
        "PUT",
        `${site(siteId)}/components/${componentId}/reading-override`,
        b,
        z.object({ override: overrideSchema }),
      )
      .then((d) => d.override),
  );
export const useRemoveOverride = (siteId: string, componentId: string) =>
  useSiteMutation(siteId, () =>
    api.send(
      "DELETE",
      `${site(siteId)}/components/${componentId}/reading-override`,
      undefined,
      z.object({ override: z.null() }),
    ),
  );
/** Trip tests, step-voltage tests and ground-hunt steps from the phone: through the outbox like the other readings. */
export const useRecordTripTest = (siteId: string) =>
  useSiteMutation(siteId, ({ componentId, label, ...b }: TripTestBody & { componentId: string; label: string }) =>
    submitOrQueue({
      siteId,
      kind: "trip",
      label: `Trip test, ${label}`,
      url: `${site(siteId)}/components/${componentId}/trip-tests`,
      body: b,
      parse: (d) => z.object({ test: tripTestSchema }).parse(d).test,
    }),
  );
export const useRecordStepTest = (siteId: string, boardId: string) =>
  useSiteMutation(siteId, ({ label, ...b }: StepVoltageBody & { label: string }) =>
    submitOrQueue({
      siteId,
      kind: "step",
      label: `Step-voltage test, ${label}`,
      url: `${site(siteId)}/boards/${boardId}/step-voltage-tests`,
      body: b,
      parse: (d) => z.object({ test: stepVoltageSchema }).parse(d).test,
    }),
  );
/** The outbox URL of a board's ground-hunt steps (the form lists the steps still waiting on the phone). */
export const huntStepsUrl = (siteId: string, boardId: string) => `${site(siteId)}/boards/${boardId}/ground-hunts`;
export const useRecordHuntStep = (siteId: string, boardId: string) =>
  useSiteMutation(siteId, (b: GroundHuntBody) =>
    submitOrQueue({
      siteId,
      kind: "hunt",
      label: `Ground-hunt step, ${b.hunt}: ${b.action} ${b.feeder}`,
      url: huntStepsUrl(siteId, boardId),
      body: b,
      parse: (d) => z.object({ step: groundHuntStepSchema }).parse(d).step,
    }),
  );
