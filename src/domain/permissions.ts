import { ROLES, type Role } from "./vocab";

/** A person's standing on one site: a member's role, or "admin" (an instance admin counts as every role). */
export type SiteRole = Role | "admin";

const EVERY_MEMBER: readonly Role[] = ROLES;
const CURATOR: readonly Role[] = ["curator"];
/** The crew at the board: the curator and volunteers. */
const FIELD: readonly Role[] = ["curator", "volunteer"];

/**
 * Who may do what on a site: the one table, read by the server's route guards
 * (`requireSiteRole(db, action)`) and services and by every page and control on the client.
 * Roles of a site's members only; an instance admin may do everything (see `can`).
 * Some actions have further rules of their own beyond the role (a volunteer moves only the
 * defects they work on, signing energise needs a current qualification): those live with
 * their domain (defect-workflow.ts, return-to-service.ts) and are checked as well.
 * Tideline's own rules, decided with the crews' roles in the brief.
 */
export const PERMISSIONS = {
  /** Read everything on the site: survey, photos (renditions), readings, defects, parts, reports. */
  "site.read": EVERY_MEMBER,
  "members.manage": CURATOR,
  "invitations.manage": CURATOR,
  /** The site's own settings: its time zone (exports) and currency (every money figure). */
  "site.settings": CURATOR,

  /** Boards, sections, positions, nameplates, dispositions, flood record, CSV import. */
  "inventory.curate": CURATOR,
  /** Inspections and custody moves (the quick log), the next free tag. */
  "inventory.log": FIELD,
  /** Release a custody move the chain refuses, with a reason. */
  "custody.release": CURATOR,

  /** Upload photos (volunteers to their own inspections, moves and defects; see server/photos/targets.ts). */
  "photos.upload": ["curator", "photographer", "volunteer"],
  /** Caption and tag a photo (volunteers their own only; see server/photos/service.ts). */
  "photos.edit": ["curator", "photographer", "volunteer"],
  /** The photo desk: file a whole shoot to positions, tag any photo, see the shoot list. */
  "photos.file": ["curator", "photographer"],
  /** The untouched original, which still carries the camera's GPS. */
  "photos.original": ["curator", "photographer"],
  "photos.delete": CURATOR,
  "photos.settings": CURATOR,

  "readings.record": FIELD,
  /** Site criteria and a component's manufacturer override. */
  "readings.criteria": CURATOR,

  /** Raise defects; edit and move the ones they raised or work on (defect-workflow.ts decides which). */
  "defects.raise": FIELD,
  /** Do repair work on a defect: the roles a defect may be assigned to (server/defects/service.ts `assign`). */
  "defects.repair": FIELD,
  /** Schedule, assign, set due dates, the curator's order, defer, close, reopen, bulk changes, the repair plan. */
  "defects.manage": CURATOR,
  /** Attach photos to a defect as evidence. */
  "defects.photos": ["curator", "volunteer", "photographer"],

  /** Wanted list lines, leads, statuses, share links. */
  "parts.edit": ["curator", "scrounger"],
  "parts.heritage_rule": CURATOR,
  "parts.revoke_share": CURATOR,

  "reports.survey": EVERY_MEMBER,
  "reports.labels": ["curator", "volunteer", "photographer", "scrounger"],
  "tags.assign": FIELD,

  "rts.read": EVERY_MEMBER,
  /** Stages, steps, the site's template and settings. */
  "rts.plan": CURATOR,
  /** Sign a hold point (energise and release also need a current qualification). */
  "rts.sign": FIELD,
  "rts.release_blocked": CURATOR,
  "rts.record_watch": FIELD,
  "rts.record_incident": FIELD,
  "rts.record_operation": FIELD,
  "rts.set_budget": CURATOR,
  "rts.manage_qualified": CURATOR,
  "rts.restart": CURATOR,
  "rts.de_energise": FIELD,
} as const satisfies Record<string, readonly Role[]>;

export type Action = keyof typeof PERMISSIONS;
export const ACTIONS = Object.keys(PERMISSIONS) as Action[];

/** May someone with this standing on the site do this? No standing (not a member) may do nothing. */
export function can(role: SiteRole | null | undefined, action: Action): boolean {
  if (!role) return false;
  if (role === "admin") return true;
  return (PERMISSIONS[action] as readonly Role[]).includes(role);
}

/** The members' roles that may do this (an instance admin always may). */
export const rolesFor = (action: Action): Role[] => [...PERMISSIONS[action]];
