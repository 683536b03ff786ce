import { can } from "../../domain/permissions";
import type { DefectOptions } from "../../schemas/defects";

type Member = DefectOptions["crew"][number];

/**
 * The people a defect may be assigned to: those whose role does repair work (`defects.repair` in the
 * permission table; the server refuses anyone else with 422). `keep` is the current assignee, listed
 * even when no longer eligible so the picker shows who holds it.
 */
export function repairCrew(options: DefectOptions | undefined, keep?: string | null) {
  return (options?.crew ?? []).filter((c) => can(c.role, "defects.repair") || c.id === keep);
}

/** "Tobias Quell · volunteer": the role beside the name, so the curator sees why someone is listed. */
export const memberLabel = (c: Member) => `${c.name} · ${c.role}`;
