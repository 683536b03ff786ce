import { can, type Action, type SiteRole } from "../domain/permissions";
import { paths } from "./paths";

export interface NavItem {
  label: string;
  href: (siteId: string) => string;
  /** Who sees the item: those who may do this (src/domain/permissions.ts); absent means every member. */
  action?: Action;
  /**
   * The pages below its own that the item stands for (a path after /sites/:siteId), so a board, a defect or a
   * board's readings still show where in the site one is; its own page is matched exactly.
   */
  within?: RegExp;
}

type Who = SiteRole;

/** The site's navigation, in order. Each feature adds its pages here. */
export const SITE_NAV: NavItem[] = [
  { label: "Overview", href: (s) => paths.site.href(s) },
  { label: "Boards", href: (s) => paths.boards.href(s), within: /^\/boards\/(new|[^/]+(\/setup)?)$/ },
  { label: "Quick log", href: (s) => paths.quickLog.href(s), action: "inventory.log" },
  { label: "Defects", href: (s) => paths.defects.href(s), within: /^\/defects\// },
  { label: "Repair plan", href: (s) => paths.repairPlan.href(s), action: "defects.manage" },
  { label: "Readings", href: (s) => paths.readings.href(s), within: /^\/readings\// },
  {
    label: "Return to service",
    href: (s) => paths.returnToService.href(s),
    within: /^\/(return-to-service\/|boards\/[^/]+\/(return-to-service|watch)(\/|$))/,
  },
  { label: "Photo desk", href: (s) => paths.photos.href(s), action: "photos.file" },
  { label: "Shoot list", href: (s) => paths.photoShootList.href(s), action: "photos.file" },
  { label: "Photos", href: (s) => paths.photoGallery.href(s) },
  { label: "Wanted parts", href: (s) => paths.parts.href(s), within: /^\/parts\// },
  { label: "Reports", href: (s) => paths.reports.href(s) },
  { label: "Scan tag", href: () => paths.scan.href() },
  { label: "Flood record", href: (s) => paths.floodEvents.href(s), action: "inventory.curate" },
  { label: "Import CSV", href: (s) => paths.inventoryImport.href(s), action: "inventory.curate" },
  { label: "Crew", href: (s) => paths.members.href(s), action: "members.manage" },
];

/** The four pages each role reaches for most on a phone (the rest sit under "More"). */
const PHONE_BAR: Record<Who, string[]> = {
  curator: ["Overview", "Boards", "Defects", "Quick log"],
  admin: ["Overview", "Boards", "Defects", "Quick log"],
  volunteer: ["Quick log", "Scan tag", "Boards", "Readings"],
  photographer: ["Photo desk", "Shoot list", "Boards", "Overview"],
  scrounger: ["Wanted parts", "Boards", "Defects", "Overview"],
  viewer: ["Overview", "Boards", "Defects", "Readings"],
};

/** Does the item stand for the page at `pathname` (its own page is matched by the link itself)? */
export const isWithin = (item: NavItem, siteId: string, pathname: string) => {
  const prefix = `/sites/${siteId}`;
  return pathname.startsWith(prefix + "/") && !!item.within?.test(pathname.slice(prefix.length));
};

export const visibleNav = (role: Who) => SITE_NAV.filter((n) => !n.action || can(role, n.action));

/** The phone's bottom bar, in the role's order, and what goes under "More". */
export function phoneNav(role: Who): { bar: NavItem[]; more: NavItem[] } {
  const all = visibleNav(role);
  const names = PHONE_BAR[role];
  const bar = names.map((n) => all.find((i) => i.label === n)).filter((i): i is NavItem => !!i);
  return { bar, more: all.filter((i) => !bar.includes(i)) };
}
