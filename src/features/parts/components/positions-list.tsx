import { Link } from "react-router";
import { Button } from "../../../components/button";
import { ErrorPanel, Loading } from "../../../components/status";
import { LINE_LINKS_PAGE } from "../../../schemas/parts";
import { useLineLinks } from "../api";
import { positionHref } from "./links";

const STATE = { active: "Needs it", fitted: "✓ Fitted", withdrawn: "No longer needs it" } as const;

/**
 * Every position the line is or was for (withdrawn ones too, as its history), read from the line's links
 * route a page at a time: a line wanted by hundreds of positions opens with its first LINE_LINKS_PAGE (50) and a button
 * for the next.
 */
export function PositionsList({ siteId, lineId }: { siteId: string; lineId: string }) {
  const links = useLineLinks(siteId, lineId);
  const rows = links.data?.pages.flatMap((p) => p.links) ?? [];
  const total = links.data?.pages[0]?.total ?? 0;
  return (
    <section aria-labelledby="positions-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="positions-title" className="text-lg font-bold">
        Positions{total > 0 && <span className="ml-2 font-mono text-sm font-normal text-mist">{total}</span>}
      </h2>
      {links.isPending && <Loading what="Reading the positions" />}
      {links.isError && !links.data && <ErrorPanel error={links.error} />}
      {links.data && !total && (
        <p className="mt-1 text-mist">No position asks for this: a spare or consumable added by hand.</p>
      )}
      <ul className="mt-2 divide-y divide-hull-700" data-testid="line-positions">
        {rows.map((p) => (
          <li
            key={p.linkId}
            className={`flex flex-wrap items-center gap-3 py-2 ${p.state === "withdrawn" ? "text-fog" : ""}`}
          >
            {p.boardId && p.positionId ? (
              <Link
                to={positionHref(siteId, p.boardId, p.positionId)}
                className="inline-flex min-h-11 items-center font-mono font-semibold wrap-anywhere"
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
      {links.hasNextPage && (
        <div className="mt-3 flex flex-wrap items-center gap-3">
          <span className="text-sm text-mist">
            Showing {rows.length} of {total}
          </span>
          <Button tone="quiet" onClick={() => void links.fetchNextPage()} disabled={links.isFetchingNextPage}>
            {links.isFetchingNextPage ? "Reading…" : `Show ${Math.min(total - rows.length, LINE_LINKS_PAGE)} more`}
          </Button>
        </div>
      )}
      {links.isFetchNextPageError && <ErrorPanel error={links.error} />}
    </section>
  );
}
