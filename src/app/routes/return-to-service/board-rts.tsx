import { Link, useParams } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { clockNote } from "../../../domain/device-clock";
import { can } from "../../../domain/permissions";
import { useSession } from "../../../features/auth/api";
import { useRtsBoard } from "../../../features/return-to-service/api";
import { NewStageForm } from "../../../features/return-to-service/components/stage-form";
import { RtsTimeline } from "../../../features/return-to-service/components/rts-timeline";
import { StageCard } from "../../../features/return-to-service/components/stage-card";
import { BreakerOperations } from "../../../features/return-to-service/components/breaker-operations";
import { RtsCaution } from "../../../features/return-to-service/components/rts-caution";
import { useSiteContext } from "../sites/site-layout";
import { stamp as when } from "../../../lib/clock";

export default function BoardReturnToServicePage() {
  const { site, role } = useSiteContext();
  const { boardId = "" } = useParams();
  const q = useRtsBoard(site.id, boardId);
  const session = useSession();
  if (q.isPending) return <Loading what="Loading the return to service" />;
  if (q.isLoadingError || serverRefused(q.error)) return <ErrorPanel error={q.error} />;
  const v = q.data;
  const me = session.data?.user.id;
  const isQualified = !!v.qualifiedPersons.find((p) => p.userId === me && p.current);
  const overdue = v.stages.filter((s) => s.watch?.overdueSince);
  return (
    <div className="space-y-6">
      <p>
        <Link to={paths.board.href(site.id, boardId)} className="inline-flex min-h-11 items-center">
          ← {v.board.name}
        </Link>
      </p>
      <h1 className="text-2xl font-bold">Return to service · {v.board.name}</h1>
      <RtsCaution />
      {overdue.map((s) => (
        <p key={s.id} role="alert" className="rounded-md bg-rust-700 p-3 font-semibold">
          ⚠ Watch check overdue on “{s.name}” since {when(s.watch!.overdueSince!)}.{" "}
          <Link className="underline" to={paths.rtsWatch.href(site.id, boardId, s.id)}>
            Record it
          </Link>
        </p>
      ))}
      <p className="flex flex-wrap gap-3 text-sm">
        <Link className="inline-flex min-h-11 items-center underline" to={paths.rtsWatch.href(site.id, boardId)}>
          Watch checks (phone)
        </Link>
        <Link className="inline-flex min-h-11 items-center underline" to={paths.readingsBoard.href(site.id, boardId)}>
          The board's readings
        </Link>
        {can(role, "rts.plan") && (
          <Link className="inline-flex min-h-11 items-center underline" to={paths.rtsSettings.href(site.id)}>
            The site's hold-point template
          </Link>
        )}
      </p>
      <section aria-labelledby="plan-title" className="space-y-4">
        <h2 id="plan-title" className="text-xl font-bold">
          The plan, stage by stage
        </h2>
        {v.stages.length === 0 && <p className="text-mist">No stages planned yet.</p>}
        {v.stages.map((s, i) => (
          <StageCard
            key={s.id}
            siteId={site.id}
            boardId={boardId}
            stage={s}
            role={role}
            isQualified={isQualified}
            me={me}
            index={i}
            view={v}
          />
        ))}
        {can(role, "rts.plan") && <NewStageForm siteId={site.id} view={v} />}
      </section>
      <section aria-labelledby="timeline-title" className="space-y-2">
        <h2 id="timeline-title" className="text-xl font-bold">
          Timeline
        </h2>
        <RtsTimeline events={v.events} />
        <ol className="max-h-96 space-y-1 overflow-y-auto text-sm" aria-label="Log">
          {[...v.events].reverse().map((e) => (
            <li key={`${e.kind}-${e.id}`} className={e.alert ? "font-semibold text-flare-300" : ""}>
              {when(e.at)} — {e.title}
              {e.by ? ` (${e.by})` : ""}
              {e.detail ? ` · ${e.detail}` : ""}
              {clockNote(e, when) && (
                <span className="text-brass-300" data-testid="clock-note">
                  {" "}
                  · ⏱ {clockNote(e, when)}
                </span>
              )}
              {e.defectId && (
                <>
                  {" "}
                  ·{" "}
                  <Link className="underline" to={paths.defect.href(site.id, e.defectId)}>
                    the defect
                  </Link>
                </>
              )}
            </li>
          ))}
        </ol>
      </section>
      <section aria-labelledby="ops-title" className="space-y-2">
        <h2 id="ops-title" className="text-xl font-bold">
          Breaker operations
        </h2>
        <BreakerOperations siteId={site.id} view={v} role={role} />
      </section>
    </div>
  );
}
