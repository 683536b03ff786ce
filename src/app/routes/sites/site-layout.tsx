import { Link, NavLink, Outlet, useLocation, useOutletContext, useParams } from "react-router";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { isWithin, phoneNav, visibleNav, type NavItem } from "../../../config/nav";
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

/**
 * A link of the site's navigation: marked as the page itself on its own page (`aria-current="page"`), and as where one
 * is (`aria-current="true"`) on the pages it stands for (a board, a defect, a board's readings: `within`).
 */
function SiteTab({ item, siteId, look }: { item: NavItem; siteId: string; look: typeof tab }) {
  const { pathname } = useLocation();
  if (isWithin(item, siteId, pathname))
    return (
      <Link to={item.href(siteId)} aria-current="true" className={look({ isActive: true })}>
        {item.label}
      </Link>
    );
  return (
    <NavLink to={item.href(siteId)} end className={look}>
      {item.label}
    </NavLink>
  );
}

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
            <SiteTab key={n.label} item={n} siteId={siteId} look={tab} />
          ))}
        </nav>
      </div>
      <nav
        aria-label="Site (phone)"
        className="no-print fixed inset-x-0 bottom-0 z-30 flex gap-1 border-t border-hull-700 bg-hull-900 px-1 py-1 md:hidden"
      >
        {phone.bar.map((n) => (
          <SiteTab key={n.label} item={n} siteId={siteId} look={phoneTab} />
        ))}
        {phone.more.length > 0 && (
          <details className="relative min-w-0 flex-1">
            <summary className="flex min-h-11 cursor-pointer list-none items-center justify-center rounded-md px-1 text-[0.8rem] font-semibold text-mist">
              More
            </summary>
            <div className="absolute bottom-12 right-0 flex w-48 flex-col rounded-md bg-hull-800 p-1 ring-1 ring-hull-600">
              {phone.more.map((n) => (
                <SiteTab key={n.label} item={n} siteId={siteId} look={tab} />
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
