import { CONTAMINANT_LABELS, CUSTODY_LABELS, INSULATION_STATE_LABELS, MECHANISM_LABELS } from "../../../domain/vocab";
import type { AuditRow, CustodyMove, Inspection } from "../contract";
import { gradeTone } from "./tile-style";
import { stamp as when } from "../../../lib/clock";

const val = (v: unknown): string => {
  if (v === null || v === undefined || v === "") return "—";
  if (Array.isArray(v)) return v.length ? v.join(", ") : "—";
  if (typeof v === "object") return JSON.stringify(v);
  return String(v);
};

function changes(row: AuditRow): Array<[string, unknown, unknown]> {
  const b = (row.before ?? {}) as Record<string, unknown>;
  const a = (row.after ?? {}) as Record<string, unknown>;
  if (typeof a !== "object" || typeof b !== "object") return [];
  const keys = [...new Set([...Object.keys(b), ...Object.keys(a)])].filter(
    (k) => !["id", "version", "updatedAt", "createdAt", "siteId"].includes(k),
  );
  return keys.slice(0, 8).map((k) => [k, b[k], a[k]]);
}

/** Who changed what on this position, newest first, with before → after. */
export function AuditHistory({ rows }: { rows: AuditRow[] }) {
  if (!rows.length) return <p className="text-sm text-fog">No changes recorded yet.</p>;
  return (
    <ol className="space-y-2 text-sm" data-testid="position-history">
      {rows.map((r) => (
        <li key={r.id} className="rounded-md bg-hull-800 p-2">
          <p>
            <span className="font-semibold">{r.actorName ?? "Someone"}</span> · {r.entityType}{" "}
            {r.action.replace(/_/g, " ")}
          </p>
          <p className="text-xs text-fog">{when(r.at)}</p>
          <ul className="mt-1 space-y-0.5 font-mono text-xs text-mist">
            {changes(r).map(([k, b, a]) => (
              <li key={k} className="break-words">
                {k}:{" "}
                {b !== undefined && (
                  <>
                    <s className="text-fog">{val(b)}</s> →{" "}
                  </>
                )}
                <span className="text-chalk">{val(a)}</span>
              </li>
            ))}
          </ul>
        </li>
      ))}
    </ol>
  );
}

export function InspectionSummary({ i }: { i: Inspection }) {
  return (
    <div className="text-sm">
      <p className="flex flex-wrap items-center gap-2">
        <span className={`rounded px-1 font-mono font-bold ${gradeTone(i.astmGrade)}`}>
          {i.astmGrade == null ? "G –" : `ASTM D610 grade ${i.astmGrade}`}
        </span>
        {i.isoRi && <span className="font-mono text-mist">ISO {i.isoRi}</span>}
        {i.percentRusted != null && <span className="text-mist">{i.percentRusted} % rusted</span>}
      </p>
      <p className="mt-1 text-mist">
        {i.belowWaterLine == null
          ? "Water line: not recorded"
          : i.belowWaterLine
            ? "Was below the water line"
            : "Stayed above the water line"}
        {i.mechanism && ` · mechanism: ${MECHANISM_LABELS[i.mechanism].toLowerCase()}`}
        {i.insulation && ` · insulation: ${INSULATION_STATE_LABELS[i.insulation].toLowerCase()}`}
      </p>
      {i.contaminants.length > 0 && (
        <p className="text-mist">Found: {i.contaminants.map((c) => CONTAMINANT_LABELS[c].toLowerCase()).join(", ")}</p>
      )}
      {i.notes && <p className="mt-1">“{i.notes}”</p>}
      <p className="text-xs text-fog">
        {i.inspectorName ?? "Someone"} · {when(i.inspectedAt)}
      </p>
    </div>
  );
}

export function CustodyTrail({ moves }: { moves: CustodyMove[] }) {
  if (!moves.length) return <p className="text-sm text-fog">Never moved: still where it was found.</p>;
  return (
    <ol className="space-y-1 text-sm">
      {moves.map((m) => (
        <li key={m.id} className="border-l-2 border-hull-500 pl-2">
          {CUSTODY_LABELS[m.fromState]} → <strong>{CUSTODY_LABELS[m.toState]}</strong>
          {m.location && <span className="text-mist"> · {m.location}</span>}
          {m.note && <span className="block text-mist">“{m.note}”</span>}
          {m.releaseReason && (
            <span
              className="mt-0.5 block rounded bg-flare-700/30 px-1.5 py-0.5 text-flare-300"
              data-testid="custody-release"
            >
              Released by the curator past {m.releasedRules.length} check{m.releasedRules.length === 1 ? "" : "s"} of
              the chain: “{m.releaseReason}”
            </span>
          )}
          <span className="block text-xs text-fog">
            {m.movedByName ?? "Someone"} ·{" "}
            {m.madeAt
              ? `made ${when(m.madeAt)} on a phone with no signal, applied ${when(m.movedAt)}`
              : when(m.movedAt)}
          </span>
        </li>
      ))}
    </ol>
  );
}
