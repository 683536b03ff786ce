import { useQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router";
import { paths } from "../../../config/paths";
import { DEFECT_STATUS_LABELS } from "../../../domain/vocab";
import { api } from "../../../lib/api-client";
import { readingDefectsResponse } from "../../../schemas/defects";

type Kind = "insulation" | "contact" | "thermal" | "ground";
interface Reading {
  id: string;
  boardId: string;
  componentId?: string | null;
  judgement: { verdict: string; level?: number };
}

/** The defect a failing reading asks for: category and severity from what failed (thermal level 4 → disabling). */
function prefill(kind: Kind, r: Reading) {
  if (kind === "thermal")
    return {
      category: "heat",
      severity: (r.judgement.level ?? 0) >= 4 ? "disabling" : (r.judgement.level ?? 0) >= 3 ? "impaired" : "degraded",
    };
  if (kind === "contact") return { category: "wiring", severity: "impaired" };
  return { category: "insulation", severity: "impaired" };
}

/**
 * Under a reading: the defects it raised or proves (a two-way link), or — when it
 * does not meet its criterion and none is linked yet — "Raise a defect", prefilled.
 */
export function ReadingDefects({ kind, reading }: { kind: Kind; reading: Reading }) {
  const { siteId = "" } = useParams();
  const links = useQuery({
    queryKey: ["readings", siteId, "reading-defects", reading.boardId],
    queryFn: ({ signal }) =>
      api.get(`/api/sites/${siteId}/boards/${reading.boardId}/reading-defects`, readingDefectsResponse, signal),
    staleTime: 10_000,
  });
  const mine = (links.data?.links ?? []).filter((l) => l.readingKind === kind && l.readingId === reading.id);
  if (mine.length)
    return (
      <p className="mt-1 text-sm" data-testid="reading-defects">
        {mine.map((l) => (
          <Link key={l.defectId} className="mr-2 underline" to={paths.defect.href(siteId, l.defectId)}>
            D-{l.ref} {l.role === "raised_from" ? "raised from this reading" : "re-tested by this reading"} (
            {DEFECT_STATUS_LABELS[l.status]})
          </Link>
        ))}
      </p>
    );
  if (reading.judgement.verdict === "meets" || !siteId) return null;
  const href = `${paths.defectNew.href(siteId, { boardId: reading.boardId, componentId: reading.componentId ?? undefined, ...prefill(kind, reading) })}&readingKind=${kind}&readingId=${reading.id}`;
  return (
    <p className="mt-1">
      <Link
        className="inline-flex min-h-11 items-center rounded-md px-3 text-sm font-semibold ring-1 ring-rust-400"
        to={href}
      >
        Raise a defect from this reading
      </Link>
    </p>
  );
}
