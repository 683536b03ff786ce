import { Link, useParams } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { useLineDetail } from "../../../features/parts/api";
import { Money } from "../../../lib/money";
import { HistoryList } from "../../../features/parts/components/history-list";
import { LeadsPanel } from "../../../features/parts/components/leads-panel";
import { HeritageRuleForm, LineEditForm } from "../../../features/parts/components/line-edit-form";
import { LineSummary } from "../../../features/parts/components/line-summary";
import { PositionsList } from "../../../features/parts/components/positions-list";
import { StatusForm } from "../../../features/parts/components/status-form";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";

export default function PartLinePage() {
  const { site, role } = useSiteContext();
  const { lineId = "" } = useParams();
  const detail = useLineDetail(site.id, lineId);
  const canEdit = can(role, "parts.edit");
  if (detail.isPending) return <Loading what="Opening the line" />;
  if (detail.isLoadingError || serverRefused(detail.error))
    return (
      <ErrorPanel error={detail.error}>
        <Link to={paths.parts.href(site.id)}>Back to the wanted list</Link>
      </ErrorPanel>
    );
  const { line, leads, acquisitions, history } = detail.data;
  return (
    <div className="space-y-5">
      <Link to={paths.parts.href(site.id)} className="no-print inline-flex min-h-11 items-center">
        ← Wanted parts
      </Link>
      <LineSummary line={line} />
      {can(role, "parts.heritage_rule") && <HeritageRuleForm siteId={site.id} line={line} />}
      <div className="grid gap-4 lg:grid-cols-2">
        <PositionsList siteId={site.id} lineId={line.id} />
        {canEdit && <StatusForm siteId={site.id} detail={detail.data} />}
      </div>
      <LeadsPanel siteId={site.id} lineId={line.id} leads={leads} canEdit={canEdit} />
      {acquisitions.length > 0 && (
        <section aria-labelledby="acq-title" className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
          <h2 id="acq-title" className="text-lg font-bold">
            Acquired
          </h2>
          <ul className="mt-2 space-y-1">
            {acquisitions.map((a) => (
              <li key={a.id} className="text-sm">
                <span className="font-mono">{a.acquiredOn}</span> · {a.qty} for <Money value={a.cost} />
                {a.notes ? ` · ${a.notes}` : ""}
              </li>
            ))}
          </ul>
        </section>
      )}
      {canEdit ? (
        <LineEditForm siteId={site.id} line={line} />
      ) : (
        line.notes && <p className="text-mist">Notes: {line.notes}</p>
      )}
      <HistoryList history={history} />
    </div>
  );
}
