import type { Role } from "../domain/vocab";
import { paths } from "./paths";

export interface NavItem {
  label: string;
  href: (siteId: string) => string;
  /** Roles that see the item; empty means every member. */
  roles: Array<Role | "admin">;
  /** Shown in the phone's bottom bar (keep it to four per role). */
  phone?: boolean;
}

/** The site's navigation, in order. Each feature adds its pages here. */
export const SITE_NAV: NavItem[] = [
  { label: "Overview", href: (s) => paths.site.href(s), roles: [], phone: true },
  { label: "Boards", href: (s) => paths.boards.href(s), roles: [], phone: true },
  { label: "Quick log", href: (s) => paths.quickLog.href(s), roles: ["volunteer", "curator", "admin"], phone: true },
  { label: "Flood", href: (s) => paths.floodEvents.href(s), roles: ["curator", "admin"] },
  { label: "Import CSV", href: (s) => paths.inventoryImport.href(s), roles: ["curator", "admin"] },
  { label: "Defects", href: (s) => paths.defects.href(s), roles: [], phone: true },
  { label: "Repair plan", href: (s) => paths.repairPlan.href(s), roles: ["curator", "admin"] },
  { label: "Readings", href: (s) => paths.readings.href(s), roles: [], phone: true },
  { label: "Crew", href: (s) => paths.members.href(s), roles: ["curator", "admin"] },
  // In the phone bar for the photographer only (the curator's four are taken).
  { label: "Photo desk", href: (s) => paths.photos.href(s), roles: ["photographer"], phone: true },
  { label: "Photo desk", href: (s) => paths.photos.href(s), roles: ["curator", "admin"] },
  { label: "Shoot list", href: (s) => paths.photoShootList.href(s), roles: ["photographer", "curator", "admin"] },
  { label: "Photos", href: (s) => paths.photoGallery.href(s), roles: [] },
  { label: "Wanted parts", href: (s) => paths.parts.href(s), roles: [], phone: true },
];

export const visibleNav = (role: Role | "admin") => SITE_NAV.filter((n) => !n.roles.length || n.roles.includes(role));
