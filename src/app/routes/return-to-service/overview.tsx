import { Link } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { ErrorPanel, Loading } from "../../../components/status";
import { paths } from "../../../config/paths";
import { STAGE_STATE_LABELS } from "../../../domain/rts-gate";
import { useRtsOverview } from "../../../features/return-to-service/api";
import { useSiteContext } from "../sites/site-layout";

export default function ReturnToServiceOverviewPage() {
  const { site } = useSiteContext();
  const q = useRtsOverview(site.id);
  if (q.isPending) return <Loading what="Loading the return to service" />;
  if (q.isError) return <ErrorPanel error={q.error} />;
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">Return to service</h1>
      <SafetyNotice compact />
      <ul className="space-y-2">
        {q.data.map((b) => (
          <li key={b.boardId} className="rounded-md bg-hull-800 p-3 ring-1 ring-hull-600">
            <Link className="text-lg font-semibold underline" to={paths.rtsBoard.href(site.id, b.boardId)}>
              {b.boardName}
            </Link>
            <p className="text-sm">
              {b.stages ? `${b.released} of ${b.stages} stages released` : "No plan yet"}
              {b.current
                ? ` · now: ${b.current.name} — ${STAGE_STATE_LABELS[b.current.state]}${b.current.blockers ? ` (${b.current.blockers} open items)` : ""}`
                : ""}
            </p>
            {b.overdue && <p className="text-sm font-semibold text-rust-300">⚠ A watch check is overdue</p>}
          </li>
        ))}
      </ul>
    </div>
  );
}
