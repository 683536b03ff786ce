import { Link } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { useCriteria } from "../../../features/readings/api";
import { CriteriaForm } from "../../../features/readings/components/criteria-form";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";

export default function CriteriaPage() {
  const { site, role } = useSiteContext();
  const criteria = useCriteria(site.id);
  return (
    <div className="max-w-3xl space-y-4">
      <p>
        <Link to={paths.readings.href(site.id)} className="inline-flex min-h-11 items-center">
          ← All boards' readings
        </Link>
      </p>
      <h1 className="text-2xl font-bold">Reading criteria</h1>
      <p className="text-mist">
        Defaults come from the published tables; the curator may set the site's own, with the source. A manufacturer's
        value, set on a component's readings page, replaces both for that component.
      </p>
      <SafetyNotice />
      {criteria.isPending && <Loading />}
      {(criteria.isLoadingError || serverRefused(criteria.error)) && <ErrorPanel error={criteria.error} />}
      {criteria.data && (
        <CriteriaForm siteId={site.id} criteria={criteria.data} canEdit={can(role, "readings.criteria")} />
      )}
    </div>
  );
}
