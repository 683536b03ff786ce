/**
 * Concurrent edits never silently overwrite each other: the pairs below are sent at the
 * same moment; one wins and the other gets 409 with the record as it is now, and only
 * the stored change leaves an audit row.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew, makeUser } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { makeBoard } from "../helpers/mail";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
let board: Awaited<ReturnType<typeof makeBoard>>;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
  board = await makeBoard(t.db, fx.siteId);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

async function makePhoto(name: string) {
  return t.db
    .insertInto("photos")
    .values({
      siteId: fx.siteId,
      originalName: name,
      format: "jpeg",
      width: 10,
      height: 10,
      bytes: 100,
      originalKey: `o/${name}`,
      displayKey: `d/${name}`,
      thumbKey: `t/${name}`,
      uploadedBy: fx.crew.curator.id,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
}

const statuses = (rs: Array<{ status: number }>) => rs.map((r) => r.status).sort();

describe("photos", () => {
  it("of two PATCHes of one photo with the same version, one is stored and the other gets 409 with the current photo; one audit row", async () => {
    const photographer = server.client();
    await photographer.signIn(fx.crew.photographer.email);
    for (let i = 0; i < 8; i++) {
      const p = await makePhoto(`pair-${i}.jpg`);
      const rs = await Promise.all([
        curator.patch(`/api/sites/${fx.siteId}/photos/${p.id}`, { version: 1, caption: "curator's caption" }),
        photographer.patch(`/api/sites/${fx.siteId}/photos/${p.id}`, { version: 1, caption: "photographer's caption" }),
      ]);
      expect(statuses(rs)).toEqual([200, 409]);
      const lost = rs.find((r) => r.status === 409)!;
      const won = rs.find((r) => r.status === 200)!;
      expect(lost.body.error.current).toMatchObject({
        id: p.id,
        version: 2,
        caption: won.body.photo?.caption ?? expect.any(String),
      });
      const row = await t.db
        .selectFrom("photos")
        .select(["caption", "version"])
        .where("id", "=", p.id)
        .executeTakeFirstOrThrow();
      expect(row.version).toBe(2);
      const audits = await t.db
        .selectFrom("auditLog")
        .select("after")
        .where("entityId", "=", p.id)
        .where("action", "=", "update")
        .execute();
      expect(audits).toHaveLength(1);
      expect(audits[0].after).toEqual({ caption: row.caption });
    }
  });

  it("two bulk filings of the same photo at once: one files it, the other gets 409 and writes nothing", async () => {
    const p = await makePhoto("bulk.jpg");
    const other = await t.db
      .insertInto("positions")
      .values({
        siteId: fx.siteId,
        boardId: board.boardId,
        designation: "2-15",
        kind: "molded_case_breaker",
        gridRow: 1,
        gridCol: 2,
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    const body = (positionId: string) => ({ items: [{ photoId: p.id, version: 1, positionId }] });
    const rs = await Promise.all([
      curator.post(`/api/sites/${fx.siteId}/photos/assign`, body(board.positionId)),
      curator.post(`/api/sites/${fx.siteId}/photos/assign`, body(other.id)),
    ]);
    expect(statuses(rs)).toEqual([200, 409]);
    const audits = await t.db
      .selectFrom("auditLog")
      .select("action")
      .where("entityId", "=", p.id)
      .where("action", "=", "assign")
      .execute();
    expect(audits).toHaveLength(1);
  });
});

describe("membership: the last-curator rule under concurrency", () => {
  it("two curators demoting each other at the same moment: one succeeds, the other gets 409, and the site keeps a curator", async () => {
    for (let round = 0; round < 4; round++) {
      const site = await t.db
        .insertInto("sites")
        .values({ name: `Race ${round}`, kind: "vessel" })
        .returning("id")
        .executeTakeFirstOrThrow();
      const a = await makeUser(t.db, { siteId: site.id, role: "curator" });
      const b = await makeUser(t.db, { siteId: site.id, role: "curator" });
      const ca = server.client();
      const cb = server.client();
      await ca.signIn(a.email);
      await cb.signIn(b.email);
      const rs = await Promise.all([
        ca.patch(`/api/sites/${site.id}/members/${b.id}`, { role: "volunteer" }),
        cb.patch(`/api/sites/${site.id}/members/${a.id}`, { role: "volunteer" }),
      ]);
      expect(statuses(rs)).toEqual([200, 409]);
      const curators = await t.db
        .selectFrom("memberships")
        .select("userId")
        .where("siteId", "=", site.id)
        .where("role", "=", "curator")
        .execute();
      expect(curators).toHaveLength(1);
    }
  });

  it("two curators removing each other at the same moment: one succeeds, the other gets 409 (or 404: its curator role is gone)", async () => {
    const site = await t.db
      .insertInto("sites")
      .values({ name: "Race remove", kind: "vessel" })
      .returning("id")
      .executeTakeFirstOrThrow();
    const a = await makeUser(t.db, { siteId: site.id, role: "curator" });
    const b = await makeUser(t.db, { siteId: site.id, role: "curator" });
    const ca = server.client();
    const cb = server.client();
    await ca.signIn(a.email);
    await cb.signIn(b.email);
    const rs = await Promise.all([
      ca.del(`/api/sites/${site.id}/members/${b.id}`),
      cb.del(`/api/sites/${site.id}/members/${a.id}`),
    ]);
    expect(rs.filter((r) => r.status === 200)).toHaveLength(1);
    expect(rs.every((r) => r.status < 500)).toBe(true);
    const left = await t.db.selectFrom("memberships").select("role").where("siteId", "=", site.id).execute();
    expect(left).toEqual([{ role: "curator" }]);
  });

  it("every member change and removal is audited with who did it", async () => {
    const v = await makeUser(t.db, { siteId: fx.siteId, role: "volunteer" });
    expect((await curator.patch(`/api/sites/${fx.siteId}/members/${v.id}`, { role: "viewer" })).status).toBe(200);
    expect((await curator.del(`/api/sites/${fx.siteId}/members/${v.id}`)).status).toBe(200);
    const rows = await t.db
      .selectFrom("auditLog")
      .select(["action", "actorId", "before", "after"])
      .where("entityType", "=", "membership")
      .where("entityId", "=", v.id)
      .orderBy("id")
      .execute();
    expect(rows).toEqual([
      { action: "change", actorId: fx.crew.curator.id, before: { role: "volunteer" }, after: { role: "viewer" } },
      { action: "remove", actorId: fx.crew.curator.id, before: { role: "viewer" }, after: null },
    ]);
  });
});

describe("settings: two first saves at once", () => {
  it("the site's reading criteria: one 200, one 409 with the saved criteria, never a 500", async () => {
    const body = {
      correctionMethod: "neta_20c",
      insulationMedium: "solid",
      thermalClass: "B",
      minimumMegohms: null,
      minimumSource: "",
      contactOutlierPercent: 50,
      version: 0,
    };
    const rs = await Promise.all([
      curator.put(`/api/sites/${fx.siteId}/readings/criteria`, body),
      curator.put(`/api/sites/${fx.siteId}/readings/criteria`, { ...body, contactOutlierPercent: 60 }),
    ]);
    expect(statuses(rs)).toEqual([200, 409]);
  });

  it("the shoot list's required kinds: one 200, one 409", async () => {
    const rs = await Promise.all([
      curator.put(`/api/sites/${fx.siteId}/photo-settings`, { requiredKinds: ["as_found"], version: 1 }),
      curator.put(`/api/sites/${fx.siteId}/photo-settings`, { requiredKinds: ["nameplate"], version: 1 }),
    ]);
    expect(statuses(rs)).toEqual([200, 409]);
  });
});
