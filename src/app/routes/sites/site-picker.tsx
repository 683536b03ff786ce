import { Link } from "react-router";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { ROLE_LABELS } from "../../../domain/vocab";
import { useSites } from "../../../features/sites/api";

export default function SitePicker() {
  const sites = useSites();
  return (
    <main id="main" className="mx-auto max-w-3xl p-4">
      <h1 className="text-2xl font-bold">Your sites</h1>
      <p className="mt-1 text-mist">Each site is one vessel, building or plant under restoration.</p>
      {sites.isPending && <Loading />}
      {(sites.isLoadingError || serverRefused(sites.error)) && <ErrorPanel error={sites.error} />}
      {sites.data?.length === 0 && (
        <EmptyState title="No sites yet">
          Ask your curator to add you to a site, or an instance admin to create one.
        </EmptyState>
      )}
      <ul className="mt-4 grid gap-3 sm:grid-cols-2">
        {sites.data?.map((s) => (
          <li key={s.id}>
            <Link
              to={paths.site.href(s.id)}
              className="block rounded-lg bg-hull-850 p-4 text-chalk no-underline ring-1 ring-hull-700 hover:ring-brass-400"
            >
              <span className="block text-lg font-semibold">{s.name}</span>
              <span className="block text-sm text-mist">{s.location}</span>
              <span className="mt-2 inline-block rounded bg-hull-700 px-2 py-0.5 text-xs">
                {s.role === "admin" ? "Instance admin" : ROLE_LABELS[s.role]}
              </span>
            </Link>
          </li>
        ))}
      </ul>
    </main>
  );
}
