import { useDeferredValue } from "react";
import { Link } from "react-router";
import { SafetyNotice } from "../../../components/safety-notice";
import { visibleNav } from "../../../config/nav";
import { paths } from "../../../config/paths";
import { ProgressSummary } from "../../../features/inventory/components/progress-summary";
import type { Role } from "../../../domain/vocab";
import { useSiteContext } from "./site-layout";
import { can } from "../../../domain/permissions";

const HOME: Record<Role | "admin", { title: string; intro: string }> = {
  curator: {
    title: "Restoration lead's desk",
    intro: "Decide dispositions, order the repairs and guard the original fabric.",
  },
  volunteer: { title: "Teardown log", intro: "Find a position, grade what you see, log every move of a part." },
  photographer: {
    title: "Photo desk",
    intro: "Shoot every position as found and through the work, then upload in bulk.",
  },
  scrounger: { title: "Parts hunt", intro: "Work the wanted list: leads, prices and what has arrived." },
  viewer: { title: "Progress", intro: "Follow the boards as they come back, read-only." },
  admin: {
    title: "Site administration",
    intro: "You are an instance admin on this site: everything the curator can do.",
  },
};

export default function SiteHome() {
  const { site, role } = useSiteContext();
  const home = HOME[role];
  const links = visibleNav(role).filter((n) => n.label !== "Overview");
  // Drawn one render after the rest, with the summary's breakdowns (ProgressSummary), so it never moves down the
  // screen when they come.
  const below = useDeferredValue(true, false);
  return (
    <div className="space-y-4">
      <section aria-labelledby="home-title" data-testid={`home-${role}`}>
        <h1 id="home-title" className="text-2xl font-bold">
          {home.title}
        </h1>
        <p className="mt-1 text-mist">{home.intro}</p>
        {site.description && <p className="mt-3 max-w-3xl">{site.description}</p>}
      </section>
      {links.length > 0 && (
        <ul className="grid gap-3 sm:grid-cols-3">
          {links.map((n) => (
            <li key={n.label}>
              <Link
                to={n.href(site.id)}
                className="block rounded-lg bg-hull-850 p-4 font-semibold text-chalk no-underline ring-1 ring-hull-700 hover:ring-brass-400"
              >
                {n.label}
              </Link>
            </li>
          ))}
        </ul>
      )}
      <ProgressSummary
        siteId={site.id}
        boardHref={(b) => paths.board.href(site.id, b)}
        floodHref={can(role, "inventory.curate") ? paths.floodEvents.href(site.id) : undefined}
      />
      {below && <SafetyNotice />}
    </div>
  );
}
