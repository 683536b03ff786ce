import { paths } from "../../config/paths";
import type { DefectCategory, DefectSeverity } from "../../domain/vocab";
import type { Inspection } from "./contract";

/**
 * A first guess at the defect a finding suggests, to prefill the defect form (the person
 * raising it decides): seized → mechanical, charred or tracking insulation → insulation,
 * ASTM D610 grade 4 or worse (over 3 % rusted) → corrosion. Tideline's own prefill rule.
 */
export function suggestDefect(
  i: Pick<Inspection, "astmGrade" | "mechanism" | "insulation"> | null | undefined,
): { category: DefectCategory; severity: DefectSeverity } | null {
  if (!i) return null;
  if (i.mechanism === "seized") return { category: "mechanical", severity: "disabling" };
  if (i.insulation === "charred") return { category: "insulation", severity: "disabling" };
  if (i.insulation === "tracking") return { category: "insulation", severity: "impaired" };
  if (i.astmGrade != null && i.astmGrade <= 4)
    return { category: "corrosion", severity: i.astmGrade <= 1 ? "impaired" : "degraded" };
  return null;
}

/** Link to the defect form (built by the defect register), prefilled from the position and finding. */
export function defectHref(
  siteId: string,
  p: {
    positionId: string;
    componentId?: string | null;
    inspection?: Pick<Inspection, "id" | "astmGrade" | "mechanism" | "insulation"> | null;
  },
): string {
  const u = new URLSearchParams({ positionId: p.positionId });
  if (p.componentId) u.set("componentId", p.componentId);
  if (p.inspection) u.set("inspectionId", p.inspection.id);
  const s = suggestDefect(p.inspection);
  if (s) {
    u.set("category", s.category);
    u.set("severity", s.severity);
  }
  return paths.defectNew.href(siteId, Object.fromEntries(u));
}
