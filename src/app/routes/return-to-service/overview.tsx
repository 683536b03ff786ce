import { Link } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { can } from "../../../domain/permissions";
import { STAGE_STATE_LABELS, type StageState } from "../../../domain/rts-gate";
import { useRtsOverview } from "../../../features/return-to-service/api";
import { RtsCaution } from "../../../features/return-to-service/components/rts-caution";
import { useSiteContext } from "../sites/site-layout";

/** A mark beside each state's words (never colour alone). */
const MARK: Record<StageState, string> = {
  released: "✔",
  live: "⚡",
  stopped: "■",
  de_energised: "○",
  ready_to_energise: "▷",
  blocked: "✖",
  preparing: "…",
};
const TONE: Record<StageState, string> = {
  released: "ring-kelp-400",
  live: "ring-brass-400",
  stopped: "ring-rust-400 text-rust-300",
  de_energised: "ring-hull-500",
  ready_to_energise: "ring-brass-300",
  blocked: "ring-rust-400",
  preparing: "ring-hull-500",
};

/** Each board of the site: its stages in order with their states, where it is now, and an overdue watch. */
export default function ReturnToServiceOverviewPage() {
  const { site, role } = useSiteContext();
  const q = useRtsOverview(site.id);
  if (q.isPending) return <Loading what="Loading the return to service" />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">Return to service</h1>
      <RtsCaution compact />
      {can(role, "rts.plan") && (
        <p>
          <Link className="inline-flex min-h-11 items-center underline" to={paths.rtsSettings.href(site.id)}>
            The site's hold-point template
          </Link>
        </p>
      )}
      <ul className="space-y-3">
        {q.data.map((b) => (
          <li
            key={b.boardId}
            className="space-y-2 rounded-md bg-hull-800 p-3 ring-1 ring-hull-600"
            data-testid="rts-board"
          >
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <Link className="text-lg font-semibold underline" to={paths.rtsBoard.href(site.id, b.boardId)}>
                {b.boardName}
              </Link>
              <span className="text-sm">
                {b.stages ? `${b.released} of ${b.stages} stages released` : "No plan yet"}
              </span>
            </div>
            {b.current && (
              <p className="text-sm">
                Now: <strong>{b.current.name}</strong> — {STAGE_STATE_LABELS[b.current.state]}
                {b.current.blockers
                  ? b.current.state === "live"
                    ? ` (${b.current.blockers} still to do before release)`
                    : ` (${b.current.blockers} ${b.current.blockers === 1 ? "item holds" : "items hold"} it)`
                  : ""}
              </p>
            )}
            {b.overdue && (
              <p className="text-sm font-semibold text-rust-300">
                ⚠ A watch check is overdue.{" "}
                <Link className="underline" to={paths.rtsWatch.href(site.id, b.boardId)}>
                  Record it
                </Link>
              </p>
            )}
            {b.sequence.length > 0 && (
              <ol className="flex flex-wrap gap-2 text-sm" aria-label={`Stages of ${b.boardName}`}>
                {b.sequence.map((s, i) => (
                  <li key={s.id}>
                    <Link
                      to={paths.rtsBoard.href(site.id, b.boardId, s.id)}
                      className={`inline-flex min-h-11 items-center gap-1 rounded-md bg-hull-900 px-2 ring-1 ${TONE[s.state]}`}
                    >
                      <span aria-hidden>{MARK[s.state]}</span> {i + 1}. {s.name}: {STAGE_STATE_LABELS[s.state]}
                    </Link>
                  </li>
                ))}
              </ol>
            )}
          </li>
        ))}
      </ul>
    </div>
  );
}
