import { Link } from "react-router";
import { Button } from "../../../components/button";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { thumbUrl, usePartsList } from "../../../features/parts/api";
import { PrintSheet } from "../../../features/parts/components/print-sheet";
import { useFilterParams } from "../../../features/parts/use-filter-params";
import type { PartLine } from "../../../schemas/parts";
import { useSiteContext } from "../sites/site-layout";
import { dateOf } from "../../../lib/clock";

/**
 * The positions a card names: the row's first few (a row carries LINKS_IN_ROW) and how many more the line has,
 * so the paper never claims to be the whole list; the line's page has them all.
 */
function positionsText(l: PartLine) {
  const named = l.positions
    .filter((p) => p.state === "active" && p.designation)
    .map((p) => `${p.boardName} ${p.designation}`);
  const more = l.linkCount - l.positions.length;
  return more > 0 ? `${named.join(", ")} and ${more} more (see line ${l.ref})` : named.join(", ");
}

/** The wanted list to print and hand round: the current filter, one card per line with its nameplate photo. */
export default function PartsPrintPage() {
  const { site } = useSiteContext();
  const [filter, , search] = useFilterParams();
  // Printing takes the whole filter (up to 500 lines, the server's largest page), not the page on screen.
  const list = usePartsList(site.id, { ...filter, page: undefined, size: 500 });
  return (
    <div className="space-y-4">
      <div className="no-print flex flex-wrap items-center gap-3">
        <Link to={paths.parts.href(site.id, search)} className="inline-flex min-h-11 items-center">
          ← Back to the list
        </Link>
        <Button onClick={() => window.print()}>Print</Button>
      </div>
      <h1 className="text-2xl font-bold print:text-black">Parts wanted for {site.name}</h1>
      <p className="text-mist print:text-black">
        Printed {dateOf(new Date())}. Shapes mark the heritage rule: ◆ original pattern only, ◈ period equivalent
        acceptable, ○ modern equivalent acceptable.
      </p>
      {list.isPending && <Loading />}
      {(list.isLoadingError || serverRefused(list.error)) && <ErrorPanel error={list.error} />}
      {list.data && !list.data.lines.length && <EmptyState title="Nothing to print for this filter" />}
      {list.data && list.data.total > list.data.lines.length && (
        <p className="no-print text-flare-300">
          Showing the first {list.data.lines.length} of {list.data.total} lines: narrow the filter to print the rest.
        </p>
      )}
      {list.data && (
        <PrintSheet
          lines={list.data.lines.map((l) => ({
            ...l,
            ref: l.ref,
            photoUrl: l.photoIds[0] ? thumbUrl(site.id, l.photoIds[0]) : null,
            positions: positionsText(l),
          }))}
        />
      )}
    </div>
  );
}
