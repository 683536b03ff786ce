import { NavLink, Outlet, useOutletContext, useParams } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { phoneNav, visibleNav } from "../../../config/nav";
import type { SiteSummary } from "../../../schemas/sites";
import { useSite } from "../../../features/sites/api";
import { CurrencyProvider } from "../../../lib/money";

export interface SiteContext {
  site: SiteSummary;
  role: SiteSummary["role"];
}
export const useSiteContext = () => useOutletContext<SiteContext>();

/** Phone bar: five equal cells (four pages and More) that fit 320 px, each at least 44 px tall. */
const phoneTab = ({ isActive }: { isActive: boolean }) =>
  `flex min-h-11 min-w-0 flex-1 items-center justify-center rounded-md px-1 text-center text-[0.8rem] leading-tight font-semibold no-underline ${isActive ? "bg-hull-700 text-brass-300" : "text-mist hover:text-chalk"}`;

const tab = ({ isActive }: { isActive: boolean }) =>
  `whitespace-nowrap rounded-md px-3 py-2 text-sm font-semibold no-underline ${isActive ? "bg-hull-700 text-brass-300" : "text-mist hover:text-chalk"}`;

export default function SiteLayout() {
  const { siteId = "" } = useParams();
  const site = useSite(siteId);
  if (site.isPending) return <Loading what="Opening the site" />;
  if (site.isLoadingError || serverRefused(site.error))
    return (
      <main className="p-4">
        <ErrorPanel error={site.error} />
      </main>
    );
  const nav = visibleNav(site.data.role);
  const phone = phoneNav(site.data.role);
  return (
    <>
      <div className="no-print border-b border-hull-700 bg-hull-900/60 px-4">
        <p className="pt-2 text-xs uppercase tracking-widest text-fog">{site.data.kind}</p>
        <p className="text-lg font-bold" data-testid="site-name">
          {site.data.name}
        </p>
        <nav aria-label="Site" className="-mx-1 hidden flex-wrap gap-1 py-2 md:flex">
          {nav.map((n) => (
            <NavLink key={n.label} to={n.href(siteId)} end className={tab}>
              {n.label}
            </NavLink>
          ))}
        </nav>
      </div>
      <nav
        aria-label="Site (phone)"
        className="no-print fixed inset-x-0 bottom-0 z-30 flex gap-1 border-t border-hull-700 bg-hull-900 px-1 py-1 md:hidden"
      >
        {phone.bar.map((n) => (
          <NavLink key={n.label} to={n.href(siteId)} end className={phoneTab}>
            {n.label}
          </NavLink>
        ))}
        {phone.more.length > 0 && (
          <details className="relative min-w-0 flex-1">
            <summary className="flex min-h-11 cursor-pointer list-none items-center justify-center rounded-md px-1 text-[0.8rem] font-semibold text-mist">
              More
            </summary>
            <div className="absolute bottom-12 right-0 flex w-48 flex-col rounded-md bg-hull-800 p-1 ring-1 ring-hull-600">
              {phone.more.map((n) => (
                <NavLink key={n.label} to={n.href(siteId)} end className={tab}>
                  {n.label}
                </NavLink>
              ))}
            </div>
          </details>
        )}
      </nav>
      <main id="main" className="mx-auto max-w-6xl p-4">
        <CurrencyProvider currency={site.data.currency}>
          <Outlet context={{ site: site.data, role: site.data.role } satisfies SiteContext} />
        </CurrencyProvider>
      </main>
    </>
  );
}
