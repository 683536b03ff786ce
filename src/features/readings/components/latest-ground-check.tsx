import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { SafetyNotice } from "../../../components/safety-notice";
import { useLatestGroundCheck } from "../latest-ground-check";
import { GroundCheckCard } from "./ground-check-history";

/**
 * Self-contained: the board page composes it with just the site and board ids.
 * Shows the latest ground-lamp check with the suspected phase in words, and the safety caution with it
 * unless the page around it shows the caution already (`caution={false}`: the board's readings page
 * has it just above, and two notices back to back read as noise).
 */
export function LatestGroundCheck({
  siteId,
  boardId,
  caution = true,
}: {
  siteId: string;
  boardId: string;
  caution?: boolean;
}) {
  const latest = useLatestGroundCheck(siteId, boardId);
  return (
    <section
      aria-labelledby={`latest-ground-${boardId}`}
      className="space-y-2 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700"
    >
      <h2 id={`latest-ground-${boardId}`} className="text-lg font-bold">
        Latest ground-lamp check
      </h2>
      {latest.isPending && <Loading what="Reading the lamps" />}
      {(latest.isLoadingError || serverRefused(latest.error)) && <ErrorPanel error={latest.error} />}
      {latest.data === null && <p className="text-mist">No ground-lamp check recorded on this board yet.</p>}
      {latest.data && <GroundCheckCard check={latest.data} />}
      {caution && <SafetyNotice compact />}
    </section>
  );
}
