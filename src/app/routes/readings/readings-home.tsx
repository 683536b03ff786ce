import { Link } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { useReadingTargets } from "../../../features/readings/api";
import { useSiteContext } from "../sites/site-layout";

export default function ReadingsHome() {
  const { site } = useSiteContext();
  const targets = useReadingTargets(site.id);
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">Test readings</h1>
      <p className="max-w-3xl text-mist">
        Insulation resistance through the dry-out, pole contact resistance, thermal scans and ground-lamp checks, each
        judged against this site's recorded criteria.
      </p>
      <SafetyNotice />
      {targets.isPending && <Loading />}
      {(targets.isLoadingError || serverRefused(targets.error)) && <ErrorPanel error={targets.error} />}
      {targets.data?.length === 0 && (
        <EmptyState title="No boards yet">The curator adds the boards in the inventory first.</EmptyState>
      )}
      <ul className="grid gap-3 sm:grid-cols-2">
        {targets.data?.map((b) => (
          <li key={b.id}>
            <Link
              to={paths.readingsBoard.href(site.id, b.id)}
              className="block min-h-11 rounded-lg bg-hull-850 p-4 text-chalk no-underline ring-1 ring-hull-700 hover:ring-brass-400"
            >
              <span className="block text-lg font-semibold">{b.name}</span>
              <span className="block text-sm text-mist">
                {b.nominalVolts} V · {b.positionCount} positions
              </span>
            </Link>
          </li>
        ))}
      </ul>
      <p>
        <Link to={paths.readingsCriteria.href(site.id)} className="inline-flex min-h-11 items-center">
          Criteria the readings are judged against
        </Link>
      </p>
    </div>
  );
}
