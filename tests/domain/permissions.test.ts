import { describe, expect, it } from "vitest";
import { ACTIONS, can, PERMISSIONS, type Action } from "../../src/domain/permissions";
import { ROLES } from "../../src/domain/vocab";

/*
 * The permission table, tested once as a table: each row is what the crews were promised
 * (Tideline's own rules, from the roles in the brief), written out again here so that a
 * changed cell in src/domain/permissions.ts shows up as a failing row.
 * Columns: curator, volunteer, photographer, scrounger, viewer (an instance admin may do everything).
 */
const Y = true;
const N = false;
const EXPECTED: Record<Action, [boolean, boolean, boolean, boolean, boolean]> = {
  "site.read": [Y, Y, Y, Y, Y],
  "members.manage": [Y, N, N, N, N],
  "invitations.manage": [Y, N, N, N, N],
  "site.settings": [Y, N, N, N, N],
  "inventory.curate": [Y, N, N, N, N],
  "inventory.log": [Y, Y, N, N, N],
  "custody.release": [Y, N, N, N, N],
  "photos.upload": [Y, Y, Y, N, N],
  "photos.edit": [Y, Y, Y, N, N],
  "photos.file": [Y, N, Y, N, N],
  "photos.original": [Y, N, Y, N, N],
  "photos.delete": [Y, N, N, N, N],
  "photos.settings": [Y, N, N, N, N],
  "readings.record": [Y, Y, N, N, N],
  "readings.criteria": [Y, N, N, N, N],
  "defects.raise": [Y, Y, N, N, N],
  "defects.manage": [Y, N, N, N, N],
  "defects.repair": [Y, Y, N, N, N],
  "defects.photos": [Y, Y, Y, N, N],
  "parts.edit": [Y, N, N, Y, N],
  "parts.heritage_rule": [Y, N, N, N, N],
  "parts.revoke_share": [Y, N, N, N, N],
  "reports.survey": [Y, Y, Y, Y, Y],
  "reports.labels": [Y, Y, Y, Y, N],
  "tags.assign": [Y, Y, N, N, N],
  "rts.read": [Y, Y, Y, Y, Y],
  "rts.plan": [Y, N, N, N, N],
  "rts.sign": [Y, Y, N, N, N],
  "rts.release_blocked": [Y, N, N, N, N],
  "rts.record_watch": [Y, Y, N, N, N],
  "rts.record_incident": [Y, Y, N, N, N],
  "rts.record_operation": [Y, Y, N, N, N],
  "rts.set_budget": [Y, N, N, N, N],
  "rts.manage_qualified": [Y, N, N, N, N],
  "rts.restart": [Y, N, N, N, N],
  "rts.de_energise": [Y, Y, N, N, N],
};

describe("who may do what (src/domain/permissions.ts)", () => {
  it("has a row here for every action in the table and no other", () => {
    expect(Object.keys(EXPECTED).sort()).toEqual([...ACTIONS].sort());
  });

  const cells = ACTIONS.flatMap((action) => ROLES.map((role, i) => [action, role, EXPECTED[action][i]] as const));
  it.each(cells)("%s by a %s: %s", (action, role, allowed) => {
    expect(can(role, action)).toBe(allowed);
  });

  it.each(ACTIONS)("an instance admin may %s", (action) => expect(can("admin", action)).toBe(true));

  it.each(ACTIONS)("someone with no role on the site may not %s", (action) => {
    expect(can(null, action)).toBe(false);
    expect(can(undefined, action)).toBe(false);
  });

  it("names actions with a dot, so they never read as a role", () => {
    for (const a of ACTIONS) expect(a).toMatch(/^[a-z]+\.[a-z_]+$/);
    for (const r of ROLES) expect(ACTIONS).not.toContain(r);
  });

  it("lists only roles that exist", () => {
    for (const roles of Object.values(PERMISSIONS)) for (const r of roles) expect(ROLES).toContain(r);
  });
});
