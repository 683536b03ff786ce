/**
 * The authorization matrix, built from the app's own route table: every method + path
 * mounted under /api (read from createApp()'s Express router stack) is asked by every
 * role, by an instance admin, by a member of another site and by someone signed out.
 * What each may do comes from ACCESS below; a route that is not in ACCESS fails the test,
 * so a new route cannot ship without saying who may call it.
 *
 * "Allowed" means the guard let the request through: whatever the handler then answers
 * (200, 400 for an empty body, 404 for a made-up id), it is not 401, not 403 and not the
 * guard's "site not found". Nobody ever gets a 500 or a stack trace.
 */
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApp } from "../../server/app";
import type { Role } from "../../src/domain/vocab";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type Res, type TestServer } from "../helpers/http";
import { listRoutes } from "../helpers/routes";

type Access = "public" | "user" | "admin" | "member" | readonly Role[];

const CURATOR = ["curator"] as const;
const FIELD = ["curator", "volunteer"] as const; // raise defects, log inspections and custody, record readings
const PHOTO_UP = ["curator", "photographer", "volunteer"] as const;
const FILING = ["curator", "photographer"] as const;
const PARTS = ["curator", "scrounger"] as const;
const LABELS = ["curator", "volunteer", "photographer", "scrounger"] as const;
/*
 * Written out here, not read from src/domain/permissions.ts: the matrix checks the routes
 * against what the crews were promised, so a wrong line in the permission table fails it.
 */

/** Who may call each route (an instance admin counts as every role on every site). */
export const ACCESS: Record<string, Access> = {
  "GET /api/health": "public",
  "GET /api/health/live": "public",
  "GET /api/health/ready": "public",
  "GET /api/metrics": "admin",
  "POST /api/auth/sign-in": "public",
  "POST /api/auth/sign-out": "public",
  "GET /api/session": "user",
  "GET /api/sites": "user",
  "POST /api/sites": "admin",
  "GET /api/sites/:siteId": "member",
  "GET /api/sites/:siteId/members": CURATOR,
  "PATCH /api/sites/:siteId/members/:userId": CURATOR,
  "DELETE /api/sites/:siteId/members/:userId": CURATOR,
  "PUT /api/sites/:siteId/time-zone": CURATOR,
  "PUT /api/sites/:siteId/currency": CURATOR,
  "GET /api/admin/users": "admin",
  "POST /api/admin/users": "admin",
  "POST /api/admin/users/:userId/suspension": "admin",
  "DELETE /api/admin/users/:userId/suspension": "admin",
  "PUT /api/admin/users/:userId/instance-admin": "admin",
  "GET /api/account/sessions": "user",
  "POST /api/account/sessions/sign-out-others": "user",
  "POST /api/sites/:siteId/photos": PHOTO_UP,
  "GET /api/sites/:siteId/photos": "member",
  "GET /api/sites/:siteId/photo-targets": "member",
  "GET /api/sites/:siteId/boards/:boardId/photo-targets": "member",
  "POST /api/sites/:siteId/photo-targets/match": FILING,
  "GET /api/sites/:siteId/photo-settings": "member",
  "PUT /api/sites/:siteId/photo-settings": CURATOR,
  "GET /api/sites/:siteId/boards/:boardId/shoot-list": "member",
  "POST /api/sites/:siteId/photos/assign": FILING,
  "GET /api/sites/:siteId/photos/:photoId": "member",
  "PATCH /api/sites/:siteId/photos/:photoId": PHOTO_UP,
  "DELETE /api/sites/:siteId/photos/:photoId": CURATOR,
  "GET /api/sites/:siteId/photos/:photoId/:rendition": "member",
  "GET /api/sites/:siteId/readings/targets": "member",
  "GET /api/sites/:siteId/readings/criteria": "member",
  "PUT /api/sites/:siteId/readings/criteria": CURATOR,
  "GET /api/sites/:siteId/boards/:boardId/readings": "member",
  "GET /api/sites/:siteId/boards/:boardId/dry-out": "member",
  "GET /api/sites/:siteId/boards/:boardId/insulation-readings": "member",
  "POST /api/sites/:siteId/boards/:boardId/insulation-readings": FIELD,
  "GET /api/sites/:siteId/boards/:boardId/contact-readings": "member",
  "GET /api/sites/:siteId/boards/:boardId/thermal-scans": "member",
  "GET /api/sites/:siteId/boards/:boardId/ground-checks": "member",
  "GET /api/sites/:siteId/boards/:boardId/ground-checks/latest": "member",
  "POST /api/sites/:siteId/boards/:boardId/ground-checks": FIELD,
  "GET /api/sites/:siteId/components/:componentId/readings": "member",
  "GET /api/sites/:siteId/components/:componentId/insulation-readings": "member",
  "GET /api/sites/:siteId/components/:componentId/contact-readings": "member",
  "POST /api/sites/:siteId/components/:componentId/contact-readings": FIELD,
  "GET /api/sites/:siteId/components/:componentId/thermal-scans": "member",
  "POST /api/sites/:siteId/components/:componentId/thermal-scans": FIELD,
  "PUT /api/sites/:siteId/components/:componentId/reading-override": CURATOR,
  "DELETE /api/sites/:siteId/components/:componentId/reading-override": CURATOR,
  "GET /api/sites/:siteId/overview": "member",
  "GET /api/sites/:siteId/flood-events": "member",
  "POST /api/sites/:siteId/flood-events": CURATOR,
  "PATCH /api/sites/:siteId/flood-events/:floodEventId": CURATOR,
  "GET /api/sites/:siteId/boards": "member",
  "POST /api/sites/:siteId/boards": CURATOR,
  "GET /api/sites/:siteId/boards/:boardId": "member",
  "GET /api/sites/:siteId/boards/:boardId/tiles": "member",
  "GET /api/sites/:siteId/boards/:boardId/thumbnail": "member",
  "PATCH /api/sites/:siteId/boards/:boardId": CURATOR,
  "POST /api/sites/:siteId/boards/:boardId/sections": CURATOR,
  "PATCH /api/sites/:siteId/sections/:sectionId": CURATOR,
  "DELETE /api/sites/:siteId/sections/:sectionId": CURATOR,
  "POST /api/sites/:siteId/boards/:boardId/positions/generate": CURATOR,
  "POST /api/sites/:siteId/boards/:boardId/positions/reorder": CURATOR,
  "POST /api/sites/:siteId/boards/:boardId/positions": CURATOR,
  "GET /api/sites/:siteId/positions/lookup": "member",
  "GET /api/sites/:siteId/positions/:positionId": "member",
  "PATCH /api/sites/:siteId/positions/:positionId": CURATOR,
  "DELETE /api/sites/:siteId/positions/:positionId": CURATOR,
  "PATCH /api/sites/:siteId/components/:componentId": CURATOR,
  "POST /api/sites/:siteId/components/:componentId/inspections": FIELD,
  "POST /api/sites/:siteId/components/:componentId/custody": FIELD,
  "GET /api/sites/:siteId/components/:componentId/recommendation": "member",
  "PUT /api/sites/:siteId/components/:componentId/disposition": CURATOR,
  "GET /api/sites/:siteId/inventory.csv": "member",
  "POST /api/sites/:siteId/inventory/import": CURATOR,
  "GET /api/sites/:siteId/invitations": CURATOR,
  "POST /api/sites/:siteId/invitations": CURATOR,
  "POST /api/sites/:siteId/invitations/:invitationId/resend": CURATOR,
  "DELETE /api/sites/:siteId/invitations/:invitationId": CURATOR,
  "GET /api/invitations/:token": "public",
  "POST /api/invitations/:token/accept": "public",
  "POST /api/auth/password-reset": "public",
  "GET /api/auth/password-reset/:token": "public",
  "POST /api/auth/password-reset/:token": "public",
  "GET /api/account/notifications": "user",
  "PUT /api/account/notifications/:key": "user",
  "POST /api/account/password": "user",
  "GET /api/admin/mailbox": "admin",
  "DELETE /api/admin/mailbox": "admin",
  "GET /api/sites/:siteId/defects": "member",
  "GET /api/sites/:siteId/defects.csv": "member",
  "GET /api/sites/:siteId/defects/options": "member",
  "GET /api/sites/:siteId/defect-positions/:boardId": "member",
  "GET /api/sites/:siteId/defect-context": "member",
  "GET /api/sites/:siteId/repair-plan": "member",
  "GET /api/sites/:siteId/repair-plan/boards/:boardId": "member",
  "GET /api/sites/:siteId/defects/views": "member",
  "POST /api/sites/:siteId/defects/views": "member",
  "PUT /api/sites/:siteId/defects/views/:viewId": "member",
  "DELETE /api/sites/:siteId/defects/views/:viewId": "member",
  "POST /api/sites/:siteId/defects/bulk": CURATOR,
  "POST /api/sites/:siteId/defects": FIELD,
  "GET /api/sites/:siteId/defects/:defectId": "member",
  "PATCH /api/sites/:siteId/defects/:defectId": FIELD,
  "POST /api/sites/:siteId/defects/:defectId/status": FIELD,
  "POST /api/sites/:siteId/defects/:defectId/assignee": CURATOR,
  "PUT /api/sites/:siteId/defects/:defectId/pin": CURATOR,
  "DELETE /api/sites/:siteId/defects/:defectId/pin": CURATOR,
  "GET /api/sites/:siteId/parts": "member",
  "GET /api/sites/:siteId/parts.csv": "member",
  "POST /api/sites/:siteId/parts": PARTS,
  "GET /api/sites/:siteId/parts/share-links": PARTS,
  "POST /api/sites/:siteId/parts/share-links": PARTS,
  "DELETE /api/sites/:siteId/parts/share-links/:linkId": CURATOR,
  "GET /api/sites/:siteId/parts/photos/:photoId/thumb": "member",
  "PATCH /api/sites/:siteId/parts/leads/:leadId": PARTS,
  "GET /api/sites/:siteId/parts/:lineId": "member",
  "GET /api/sites/:siteId/parts/:lineId/links": "member",
  "PATCH /api/sites/:siteId/parts/:lineId": PARTS,
  "PUT /api/sites/:siteId/parts/:lineId/heritage-rule": CURATOR,
  "POST /api/sites/:siteId/parts/:lineId/status": PARTS,
  "POST /api/sites/:siteId/parts/:lineId/leads": PARTS,
  "GET /api/share/parts/:token": "public",
  "GET /api/share/parts/:token/photos/:photoId": "public",
  "GET /api/sites/:siteId/return-to-service": "member",
  "GET /api/sites/:siteId/return-to-service/settings": "member",
  "PUT /api/sites/:siteId/return-to-service/settings": CURATOR,
  "GET /api/sites/:siteId/return-to-service/qualified-persons": "member",
  "PUT /api/sites/:siteId/return-to-service/qualified-persons/:userId": CURATOR,
  "DELETE /api/sites/:siteId/return-to-service/qualified-persons/:userId": CURATOR,
  "GET /api/sites/:siteId/boards/:boardId/return-to-service": "member",
  "POST /api/sites/:siteId/boards/:boardId/return-to-service/stages": CURATOR,
  "GET /api/sites/:siteId/return-to-service/stages/:stageId": "member",
  "PATCH /api/sites/:siteId/return-to-service/stages/:stageId": CURATOR,
  "DELETE /api/sites/:siteId/return-to-service/stages/:stageId": CURATOR,
  "POST /api/sites/:siteId/return-to-service/stages/:stageId/move": CURATOR,
  "POST /api/sites/:siteId/return-to-service/stages/:stageId/steps": CURATOR,
  "POST /api/sites/:siteId/return-to-service/stages/:stageId/watch-checks": FIELD,
  "POST /api/sites/:siteId/return-to-service/stages/:stageId/incidents": FIELD,
  "POST /api/sites/:siteId/return-to-service/stages/:stageId/de-energise": FIELD,
  "POST /api/sites/:siteId/return-to-service/stages/:stageId/restart": CURATOR,
  "PATCH /api/sites/:siteId/return-to-service/steps/:stepId": CURATOR,
  "DELETE /api/sites/:siteId/return-to-service/steps/:stepId": CURATOR,
  "POST /api/sites/:siteId/return-to-service/steps/:stepId/move": CURATOR,
  "POST /api/sites/:siteId/return-to-service/steps/:stepId/signoffs": FIELD,
  "POST /api/sites/:siteId/return-to-service/signoffs/:signoffId/supersede": FIELD,
  "POST /api/sites/:siteId/components/:componentId/breaker-operations": FIELD,
  "PUT /api/sites/:siteId/components/:componentId/operations-budget": CURATOR,
  "GET /api/sites/:siteId/boards/:boardId/step-voltage-tests": "member",
  "POST /api/sites/:siteId/boards/:boardId/step-voltage-tests": FIELD,
  "GET /api/sites/:siteId/boards/:boardId/ground-hunts": "member",
  "POST /api/sites/:siteId/boards/:boardId/ground-hunts": FIELD,
  "GET /api/sites/:siteId/components/:componentId/trip-tests": "member",
  "POST /api/sites/:siteId/components/:componentId/trip-tests": FIELD,
  "GET /api/sites/:siteId/reports/survey.pdf": "member",
  "GET /api/sites/:siteId/labels.pdf": LABELS,
  "POST /api/sites/:siteId/tags/assign": FIELD,
  "GET /api/tags/:tag": "user",
  // Prepared files: any member asks for a kind their role may download directly (all four: every member);
  // a file is the asker's own (others get 404 "That file was not found", which counts as allowed here).
  "POST /api/sites/:siteId/prepared-files": "member",
  "GET /api/sites/:siteId/prepared-files": "member",
  "GET /api/sites/:siteId/prepared-files/:fileId": "member",
  "GET /api/sites/:siteId/prepared-files/:fileId/download": "member",
  "POST /api/sites/:siteId/prepared-files/:fileId/retry": "member",
  "POST /api/sites/:siteId/prepared-files/:fileId/seen": "member",
  "GET /api/prepared-files/notices": "user",
  "GET /api/sites/:siteId/components/:componentId/custody-options": FIELD,
  "GET /api/sites/:siteId/tags/next": FIELD,
  "GET /api/sites/:siteId/defects/:defectId/evidence": "member",
  "POST /api/sites/:siteId/defects/:defectId/readings": FIELD,
  "GET /api/sites/:siteId/boards/:boardId/reading-defects": "member",
};

const ROLES_ON_SITE = ["curator", "volunteer", "photographer", "scrounger", "viewer"] as const;
type Who = (typeof ROLES_ON_SITE)[number] | "admin" | "outsider" | "anonymous";
const EVERYONE: Who[] = [...ROLES_ON_SITE, "admin", "outsider", "anonymous"];

type Expect = "allowed" | "401" | "403" | "site404";

/** What the guard should do for `who` on a route with `access`. */
export function expected(access: Access, who: Who, siteScoped: boolean): Expect {
  if (access === "public") return "allowed";
  if (who === "anonymous") return "401";
  if (access === "user") return "allowed";
  if (access === "admin") return who === "admin" ? "allowed" : "403";
  if (!siteScoped) throw new Error("a site role on a route without :siteId");
  if (who === "admin") return "allowed";
  if (who === "outsider") return "site404";
  if (access === "member") return "allowed";
  return (access as readonly string[]).includes(who) ? "allowed" : "403";
}

const SITE_NOT_FOUND = "That site was not found.";
const someId = randomUUID();
const token = "A".repeat(43);

function fill(path: string, siteId: string) {
  return path
    .replace(":siteId", siteId)
    .replace(/:token\b/, token)
    .replace(/:key\b/, "weekly_summary")
    .replace(/:rendition\b/, "thumb")
    .replace(/:[A-Za-z]+/g, someId);
}

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
const clients = {} as Record<Who, Client>;
const routes = () => listRoutes(createApp({ db: t.db })).filter((r) => r.path.startsWith("/api/"));

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  for (const who of EVERYONE) {
    clients[who] = server.client();
    if (who !== "anonymous") await clients[who].signIn(fx.crew[who].email);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

describe("authorization matrix (from the app's own route table)", () => {
  it("every mounted /api route is in the access table, and every entry in the table is still mounted", () => {
    const mounted = routes().map((r) => `${r.method} ${r.path}`);
    expect(mounted.length).toBeGreaterThan(100);
    expect(
      mounted.filter((k) => !(k in ACCESS)),
      "routes with no entry in ACCESS",
    ).toEqual([]);
    expect(
      Object.keys(ACCESS).filter((k) => !mounted.includes(k)),
      "ACCESS entries for routes that no longer exist",
    ).toEqual([]);
  });

  it("every role, an admin, a member of another site and a signed-out caller get what the table says, and never a 500", async () => {
    const failures: string[] = [];
    const check = async (method: string, path: string, who: Who) => {
      const key = `${method} ${path}`;
      const want = expected(ACCESS[key], who, path.includes(":siteId"));
      let c = clients[who];
      if (key === "POST /api/auth/sign-out" && who !== "anonymous") {
        c = server.client(); // signing out must not end the session the rest of the matrix uses
        await c.signIn(fx.crew[who].email);
      }
      const r: Res = await c.call(
        method,
        fill(path, fx.siteId),
        method === "GET" || method === "DELETE" ? undefined : {},
      );
      const body = typeof r.body === "string" ? r.body : JSON.stringify(r.body ?? "");
      const got =
        r.status === 401
          ? "401"
          : r.status === 403
            ? "403"
            : r.status === 404 && r.body?.error?.message === SITE_NOT_FOUND
              ? "site404"
              : "allowed";
      if (r.status >= 500) failures.push(`${key} as ${who}: ${r.status} ${body.slice(0, 200)}`);
      else if (/\bat .+\.(ts|js):\d+/.test(body)) failures.push(`${key} as ${who}: a stack trace in the body`);
      else if (got !== want) failures.push(`${key} as ${who}: expected ${want}, got ${r.status} ${body.slice(0, 120)}`);
    };
    const jobs = routes().flatMap((r) => EVERYONE.map((who) => () => check(r.method, r.path, who)));
    for (let i = 0; i < jobs.length; i += 6) await Promise.all(jobs.slice(i, i + 6).map((j) => j()));
    expect(failures).toEqual([]);
  }, 240_000);

  it("the expectations table itself: an outsider is refused like a stranger, an admin acts as every role", () => {
    expect(expected(CURATOR, "volunteer", true)).toBe("403");
    expect(expected(CURATOR, "outsider", true)).toBe("site404");
    expect(expected(CURATOR, "admin", true)).toBe("allowed");
    expect(expected("member", "anonymous", true)).toBe("401");
    expect(expected("admin", "curator", false)).toBe("403");
  });
});
