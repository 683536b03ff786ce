import type { Role } from "../domain/vocab";
import { paths } from "./paths";

export interface NavItem {
  label: string;
  href: (siteId: string) => string;
  /** Roles that see the item; empty means every member. */
  roles: Array<Role | "admin">;
}

type Who = Role | "admin";

/** The site's navigation, in order. Each feature adds its pages here. */
export const SITE_NAV: NavItem[] = [
  { label: "Overview", href: (s) => paths.site.href(s), roles: [] },
  { label: "Boards", href: (s) => paths.boards.href(s), roles: [] },
  { label: "Quick log", href: (s) => paths.quickLog.href(s), roles: ["volunteer", "curator", "admin"] },
  { label: "Defects", href: (s) => paths.defects.href(s), roles: [] },
  { label: "Repair plan", href: (s) => paths.repairPlan.href(s), roles: ["curator", "admin"] },
  { label: "Readings", href: (s) => paths.readings.href(s), roles: [] },
  { label: "Return to service", href: (s) => paths.returnToService.href(s), roles: [] },
  { label: "Photo desk", href: (s) => paths.photos.href(s), roles: ["photographer", "curator", "admin"] },
  { label: "Shoot list", href: (s) => paths.photoShootList.href(s), roles: ["photographer", "curator", "admin"] },
  { label: "Photos", href: (s) => paths.photoGallery.href(s), roles: [] },
  { label: "Wanted parts", href: (s) => paths.parts.href(s), roles: [] },
  { label: "Reports", href: (s) => paths.reports.href(s), roles: [] },
  { label: "Scan tag", href: () => paths.scan.href(), roles: [] },
  { label: "Flood record", href: (s) => paths.floodEvents.href(s), roles: ["curator", "admin"] },
  { label: "Import CSV", href: (s) => paths.inventoryImport.href(s), roles: ["curator", "admin"] },
  { label: "Crew", href: (s) => paths.members.href(s), roles: ["curator", "admin"] },
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

export const visibleNav = (role: Who) => SITE_NAV.filter((n) => !n.roles.length || n.roles.includes(role));

/** The phone's bottom bar, in the role's order, and what goes under "More". */
export function phoneNav(role: Who): { bar: NavItem[]; more: NavItem[] } {
  const all = visibleNav(role);
  const names = PHONE_BAR[role];
  const bar = names.map((n) => all.find((i) => i.label === n)).filter((i): i is NavItem => !!i);
  return { bar, more: all.filter((i) => !bar.includes(i)) };
}
