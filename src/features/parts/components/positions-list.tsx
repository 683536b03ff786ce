import { Link } from "react-router";
import type { LinePosition } from "../../../schemas/parts";
import { positionHref } from "./links";

const STATE = { active: "Needs it", fitted: "✓ Fitted", withdrawn: "No longer needs it" } as const;

export function PositionsList({ siteId, positions }: { siteId: string; positions: LinePosition[] }) {
  return (
    <section aria-labelledby="positions-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="positions-title" className="text-lg font-bold">
        Positions
      </h2>
      {!positions.length && (
        <p className="mt-1 text-mist">No position asks for this: a spare or consumable added by hand.</p>
      )}
      <ul className="mt-2 divide-y divide-hull-700">
        {positions.map((p) => (
          <li
            key={p.linkId}
            className={`flex flex-wrap items-center gap-3 py-2 ${p.state === "withdrawn" ? "text-fog" : ""}`}
          >
            {p.boardId && p.positionId ? (
              <Link
                to={positionHref(siteId, p.boardId, p.positionId)}
                className="inline-flex min-h-11 items-center font-mono font-semibold"
              >
                {p.boardName} · {p.designation}
              </Link>
            ) : (
              <span className="font-mono">{p.boardName ?? "No position"}</span>
            )}
            <span className="text-sm">
              {p.defectId ? `Defect: ${p.defectTitle}` : "Component set to replace / source"}
            </span>
            <span className="ml-auto text-sm">
              {STATE[p.state]}
              {p.qty !== 1 && p.state === "active" ? ` (qty ${p.qty})` : ""}
            </span>
          </li>
        ))}
      </ul>
    </section>
  );
}
