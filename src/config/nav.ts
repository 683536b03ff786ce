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
  { label: "Readings", href: (s) => paths.readings.href(s), roles: [], phone: true },
  { label: "Crew", href: (s) => paths.members.href(s), roles: ["curator", "admin"] },
];

export const visibleNav = (role: Role | "admin") => SITE_NAV.filter((n) => !n.roles.length || n.roles.includes(role));
