import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "../../src/domain/vocab";
import { boardDetailResponse, positionDetailResponse } from "../../src/schemas/inventory";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
const as: Record<string, Client> = {};
let base: string;

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  for (const role of ["curator", "volunteer", "photographer", "scrounger", "viewer", "admin", "outsider"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
  base = `/api/sites/${fx.siteId}`;
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

async function newBoard(name = `Board ${Math.random().toString(36).slice(2, 7)}`, extra: object = {}) {
  const r = await as.curator.post(`${base}/boards`, {
    name,
    gridRows: 4,
    gridCols: 6,
    faceHeightMm: 1600,
    waterLineMm: 900,
    ...extra,
  });
  expect(r.status).toBe(201);
  return r.body;
}
async function newPosition(boardId: string, body: object = {}) {
  const r = await as.curator.post(`${base}/boards/${boardId}/positions`, {
    designation: `P-${Math.random().toString(36).slice(2, 6)}`,
    kind: "molded_case_breaker",
    gridRow: 3,
    gridCol: 1,
    ...body,
  });
  expect(r.status).toBe(201);
  return r.body as { position: any; component: any };
}

describe("boards, sections and positions", () => {
  it("when the curator creates a board, a section and a position, the board reads back with the tile and its empty component", async () => {
    const board = await newBoard("Main board aft");
    expect(board).toMatchObject({
      name: "Main board aft",
      nominalVolts: 450,
      phases: 3,
      frequencyHz: 60,
      earthing: "ungrounded",
      version: 1,
    });
    const s = await as.curator.post(`${base}/boards/${board.id}/sections`, { name: "Generator panel" });
    expect(s.status).toBe(201);
    const { position, component } = await newPosition(board.id, {
      designation: "2-14",
      sectionId: s.body.id,
      circuit: "Fire pump",
    });
    expect(component).toMatchObject({
      kind: "molded_case_breaker",
      custody: "in_place",
      heritage: "original",
      disposition: null,
    });
    const r = await as.viewer.get(`${base}/boards/${board.id}`);
    expect(r.status).toBe(200);
    const detail = boardDetailResponse.parse(r.body);
    expect(detail.sections.map((x) => x.name)).toEqual(["Generator panel"]);
    expect(detail.positions).toHaveLength(1);
    expect(detail.positions[0]).toMatchObject({
      id: position.id,
      designation: "2-14",
      circuit: "Fire pump",
      latest: null,
      photoCount: 0,
      openDefectCount: 0,
    });
    expect(detail.positions[0].component?.id).toBe(component.id);
    const list = await as.scrounger.get(`${base}/boards`);
    expect(list.body.find((b: any) => b.id === board.id)).toMatchObject({ positionCount: 1, surveyedCount: 0 });
  });

  it("when a row is generated, 1-1 … 1-6 land left to right on the grid row; a second run is refused as duplicate", async () => {
    const board = await newBoard();
    const r = await as.curator.post(`${base}/boards/${board.id}/positions/generate`, {
      prefix: "1-",
      from: 1,
      to: 6,
      gridRow: 2,
      startCol: 1,
      kind: "fuse",
    });
    expect(r.status).toBe(201);
    expect(r.body.positions.map((p: any) => [p.position.designation, p.position.gridCol, p.component.kind])).toEqual(
      [1, 2, 3, 4, 5, 6].map((i) => [`1-${i}`, i, "fuse"]),
    );
    const again = await as.curator.post(`${base}/boards/${board.id}/positions/generate`, {
      prefix: "1-",
      from: 1,
      to: 2,
      gridRow: 3,
      startCol: 1,
      kind: "fuse",
    });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe("duplicate");
    const wide = await as.curator.post(`${base}/boards/${board.id}/positions/generate`, {
      prefix: "2-",
      from: 1,
      to: 7,
      gridRow: 3,
      startCol: 1,
      kind: "fuse",
    });
    expect(wide.status).toBe(400);
    expect(wide.body.error.fields.startCol).toBeDefined();
  });

  it("when positions are reordered, their sortOrder follows the given order", async () => {
    const board = await newBoard();
    const gen = await as.curator.post(`${base}/boards/${board.id}/positions/generate`, {
      prefix: "A",
      from: 1,
      to: 3,
      gridRow: 1,
      startCol: 1,
      kind: "meter",
    });
    const ids = gen.body.positions.map((p: any) => p.position.id);
    const r = await as.curator.post(`${base}/boards/${board.id}/positions/reorder`, { ids: [ids[2], ids[0], ids[1]] });
    expect(r.status).toBe(200);
    expect(r.body.positions.map((p: any) => p.designation)).toEqual(["A3", "A1", "A2"]);
  });

  it("when input is malformed, it answers 400 with the fields, never 500", async () => {
    const board = await newBoard();
    const r = await as.curator.post(`${base}/boards/${board.id}/positions`, {
      designation: "",
      kind: "toaster",
      gridRow: 0,
    });
    expect(r.status).toBe(400);
    expect(Object.keys(r.body.error.fields)).toEqual(
      expect.arrayContaining(["designation", "kind", "gridRow", "gridCol"]),
    );
    const off = await as.curator.post(`${base}/boards/${board.id}/positions`, {
      designation: "X",
      kind: "fuse",
      gridRow: 5,
      gridCol: 1,
    });
    expect(off.status).toBe(400);
    expect(off.body.error.fields.gridRow).toMatch(/4 rows/);
    const badId = await as.curator.get(`${base}/positions/not-a-uuid`);
    expect(badId.status).toBe(400);
    const dup = await as.curator.post(`${base}/boards/${board.id}/positions`, {
      designation: "Q-1",
      kind: "fuse",
      gridRow: 1,
      gridCol: 1,
    });
    expect(dup.status).toBe(201);
    const dup2 = await as.curator.post(`${base}/boards/${board.id}/positions`, {
      designation: "q-1",
      kind: "fuse",
      gridRow: 1,
      gridCol: 2,
    });
    expect(dup2.status).toBe(409);
    expect(dup2.body.error.fields.designation).toBeDefined();
  });

  it("when a second board takes a name the site already uses (any case), it gets 409 on name", async () => {
    await newBoard("Steering flat board");
    const r = await as.curator.post(`${base}/boards`, { name: "steering FLAT board" });
    expect(r.status).toBe(409);
    expect(r.body.error.fields.name).toBeDefined();
  });

  it("when the grid would shrink under a position, the board edit is refused with the field named", async () => {
    const board = await newBoard();
    await newPosition(board.id, { gridRow: 4, gridCol: 6 });
    const r = await as.curator.patch(`${base}/boards/${board.id}`, { gridRows: 3, version: board.version });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.gridRows).toBeDefined();
  });
});

describe("roles", () => {
  it.each(["viewer", "photographer", "scrounger", "volunteer"] as Role[])(
    "when a %s tries curator writes, each gets 403",
    async (role) => {
      const board = await newBoard();
      const { position, component } = await newPosition(board.id);
      const c = as[role];
      const tries = [
        await c.post(`${base}/boards`, { name: "Nope" }),
        await c.patch(`${base}/boards/${board.id}`, { name: "Nope", version: 1 }),
        await c.post(`${base}/boards/${board.id}/positions`, {
          designation: "Z",
          kind: "fuse",
          gridRow: 1,
          gridCol: 1,
        }),
        await c.patch(`${base}/positions/${position.id}`, { circuit: "x", version: 1 }),
        await c.patch(`${base}/components/${component.id}`, { maker: "x", version: 1 }),
        await c.put(`${base}/components/${component.id}/disposition`, {
          disposition: "clean",
          reason: "x",
          version: 1,
        }),
        await c.post(`${base}/flood-events`, { occurredOn: "2026-10-14", waterType: "salt" }),
        await c.call("POST", `${base}/inventory/import?mode=preview`, "board,designation,kind,grid_row,grid_col\n", {
          "content-type": "text/csv",
        }),
      ];
      expect(tries.map((r) => r.status)).toEqual(tries.map(() => 403));
    },
  );

  it.each(["viewer", "photographer", "scrounger"] as Role[])(
    "when a %s logs an inspection or a custody move, it gets 403",
    async (role) => {
      const { component } = await newPosition((await newBoard()).id);
      expect((await as[role].post(`${base}/components/${component.id}/inspections`, { percentRusted: 2 })).status).toBe(
        403,
      );
      expect(
        (await as[role].post(`${base}/components/${component.id}/custody`, { toState: "removed", version: 1 })).status,
      ).toBe(403);
    },
  );

  it("when a volunteer logs an inspection and a removal, both are accepted and the grade is computed", async () => {
    const { position, component } = await newPosition((await newBoard()).id);
    const i = await as.volunteer.post(`${base}/components/${component.id}/inspections`, {
      percentRusted: 5,
      belowWaterLine: true,
      contaminants: ["silt", "salt_crust"],
      mechanism: "stiff",
      insulation: "intact",
    });
    expect(i.status).toBe(201);
    // ASTM D610-08 Table 1: > 3 % up to 10 % → grade 4; ISO 4628-3 Table 1: 5 % is nearest Ri 4 (8 %) on the log scale.
    expect(i.body).toMatchObject({
      astmGrade: 4,
      isoRi: "Ri 4",
      inspectorName: "Test volunteer",
      positionId: position.id,
    });
    const m = await as.volunteer.post(`${base}/components/${component.id}/custody`, {
      toState: "removed",
      location: "Bag rack B",
      note: "Bagged",
      tagNumber: "KL-9001",
      version: component.version,
    });
    expect(m.status).toBe(201);
    expect(m.body.component).toMatchObject({
      custody: "removed",
      custodyLocation: "Bag rack B",
      tagNumber: "KL-9001",
      version: component.version + 1,
    });
    expect(m.body.move).toMatchObject({ fromState: "in_place", toState: "removed", movedByName: "Test volunteer" });
  });

  it("when someone of another site asks for a board, it answers 404 (ids of other crews are not confirmed)", async () => {
    const board = await newBoard();
    expect((await as.outsider.get(`${base}/boards/${board.id}`)).status).toBe(404);
    expect((await as.admin.get(`${base}/boards/${board.id}`)).status).toBe(200);
  });
});

describe("optimistic versions", () => {
  it("when two people edit the same component, the second save gets 409 with the fresh record and nothing is overwritten", async () => {
    const { component } = await newPosition((await newBoard()).id);
    const first = await as.curator.patch(`${base}/components/${component.id}`, {
      maker: "Harlow & Breen Electric",
      ratingAmps: 30,
      version: component.version,
    });
    expect(first.status).toBe(200);
    expect(first.body.version).toBe(component.version + 1);
    const second = await as.admin.patch(`${base}/components/${component.id}`, {
      maker: "Someone else",
      version: component.version,
    });
    expect(second.status).toBe(409);
    expect(second.body.error.code).toBe("conflict");
    expect(second.body.error.current).toMatchObject({
      id: component.id,
      maker: "Harlow & Breen Electric",
      ratingAmps: 30,
      version: component.version + 1,
    });
  });

  it.each([
    [
      "board",
      async () => {
        const b = await newBoard();
        return [`/boards/${b.id}`, { name: "Renamed" }] as const;
      },
    ],
    [
      "position",
      async () => {
        const { position } = await newPosition((await newBoard()).id);
        return [`/positions/${position.id}`, { circuit: "Changed" }] as const;
      },
    ],
  ])("when a %s is saved on a stale version, it gets 409 with the current record", async (_what, make) => {
    const [path, patch] = await make();
    expect((await as.curator.patch(`${base}${path}`, { ...patch, version: 1 })).status).toBe(200);
    const stale = await as.curator.patch(`${base}${path}`, { ...patch, version: 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current.version).toBe(2);
  });

  it("when a custody move carries a stale version, it gets 409 and no move is recorded", async () => {
    const { component } = await newPosition((await newBoard()).id);
    expect(
      (
        await as.volunteer.post(`${base}/components/${component.id}/custody`, {
          toState: "removed",
          tagNumber: "KL-9101",
          version: 1,
        })
      ).status,
    ).toBe(201);
    const stale = await as.volunteer.post(`${base}/components/${component.id}/custody`, {
      toState: "in_workshop",
      version: 1,
    });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current.custody).toBe("removed");
    const moves = await t.db
      .selectFrom("custodyMoves")
      .select("toState")
      .where("componentId", "=", component.id)
      .execute();
    expect(moves.map((m) => m.toState)).toEqual(["removed"]);
  });
});

describe("history and detail", () => {
  it("every change shows in the position's history with who did it and before/after", async () => {
    const { position, component } = await newPosition((await newBoard()).id, { designation: "H-1" });
    await as.curator.patch(`${base}/components/${component.id}`, { maker: "Northgate Switchgear Co.", version: 1 });
    await as.volunteer.post(`${base}/components/${component.id}/inspections`, { percentRusted: 0.2 });
    await as.volunteer.post(`${base}/components/${component.id}/custody`, {
      toState: "removed",
      tagNumber: "KL-9102",
      version: 2,
    });
    await as.curator.patch(`${base}/positions/${position.id}`, { circuit: "Steering gear", version: 1 });
    const r = await as.viewer.get(`${base}/positions/${position.id}`);
    expect(r.status).toBe(200);
    const d = positionDetailResponse.parse(r.body);
    expect(d.history.map((h) => h.action)).toEqual(["update", "custody", "inspect", "update", "create"]);
    const maker = d.history.find((h) => h.entityType === "component" && h.action === "update")!;
    expect(maker).toMatchObject({
      actorName: "Test curator",
      before: { maker: "" },
      after: { maker: "Northgate Switchgear Co." },
    });
    expect(d.history.find((h) => h.action === "custody")).toMatchObject({
      actorName: "Test volunteer",
      before: { custody: "in_place" },
      after: { custody: "removed" },
    });
    expect(d.inspections[0]).toMatchObject({ astmGrade: 7, isoRi: "Ri 2" }); // ASTM D610-08 Table 1: 0.2 % → 7; ISO 4628-3: nearest 0.5 % → Ri 2
    expect(d.custodyMoves).toHaveLength(1);
  });
});

describe("lookup", () => {
  it("finds by designation or tag number in any case, exact matches first, at most 20", async () => {
    const board = await newBoard("Lookup board", { gridRows: 10, gridCols: 30 });
    await as.curator.post(`${base}/boards/${board.id}/positions/generate`, {
      prefix: "7-",
      from: 1,
      to: 25,
      gridRow: 1,
      startCol: 1,
      kind: "fuse",
    });
    const r = await as.volunteer.get(`${base}/positions/lookup?q=7-1`);
    expect(r.status).toBe(200);
    expect(r.body[0]).toMatchObject({
      designation: "7-1",
      exact: true,
      matchedOn: "designation",
      boardName: "Lookup board",
    });
    expect(r.body.slice(1, 11).every((m: any) => m.designation.startsWith("7-1"))).toBe(true); // prefixes next: 7-10 … 7-19
    const { component } = await newPosition(board.id, { designation: "Z-9", gridRow: 2 });
    await as.curator.patch(`${base}/components/${component.id}`, { tagNumber: "KL-0412", version: 1 });
    const tag = await as.volunteer.get(`${base}/positions/lookup?q=kl-0412`);
    expect(tag.body[0]).toMatchObject({
      designation: "Z-9",
      tagNumber: "KL-0412",
      matchedOn: "tag",
      exact: true,
      componentVersion: 2,
    });
    expect((await as.volunteer.get(`${base}/positions/lookup?q=7-`)).body).toHaveLength(20);
    expect((await as.volunteer.get(`${base}/positions/lookup?q=`)).status).toBe(400);
    expect((await as.volunteer.get(`${base}/positions/lookup?q=%25`)).body).toEqual([]); // a literal % matches nothing
  });
});

describe("flood events and the overview", () => {
  it("when the curator records and corrects a flood event, the list shows the newest first and a stale edit gets 409", async () => {
    const a = await as.curator.post(`${base}/flood-events`, {
      occurredOn: "2026-03-02",
      waterType: "fresh",
      maxDepthM: 0.4,
      hoursSubmerged: 6,
    });
    const b = await as.curator.post(`${base}/flood-events`, {
      occurredOn: "2026-10-14",
      waterType: "salt",
      maxDepthM: 1.1,
      hoursSubmerged: 30,
      notes: "Harbour water",
    });
    expect([a.status, b.status]).toEqual([201, 201]);
    const list = await as.viewer.get(`${base}/flood-events`);
    expect(list.body.map((f: any) => f.occurredOn)).toEqual(["2026-10-14", "2026-03-02"]);
    const fix = await as.curator.patch(`${base}/flood-events/${b.body.id}`, { hoursSubmerged: 31, version: 1 });
    expect(fix.body).toMatchObject({ hoursSubmerged: 31, version: 2 });
    expect(
      (await as.curator.patch(`${base}/flood-events/${b.body.id}`, { hoursSubmerged: 29, version: 1 })).status,
    ).toBe(409);
    const bad = await as.curator.post(`${base}/flood-events`, {
      occurredOn: "14/10/2026",
      waterType: "lemonade",
      maxDepthM: -1,
    });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(["maxDepthM", "occurredOn", "waterType"]);
  });

  it("when a position's kind is corrected, its untouched component follows and the history says so", async () => {
    const { position, component } = await newPosition((await newBoard()).id, { kind: "fuse" });
    const r = await as.curator.patch(`${base}/positions/${position.id}`, { kind: "relay", version: 1 });
    expect(r.body.kind).toBe("relay");
    const d = (await as.viewer.get(`${base}/positions/${position.id}`)).body;
    expect(d.component).toMatchObject({ id: component.id, kind: "relay", version: 2 });
    expect(d.history.some((h: any) => h.entityType === "component" && h.after?.kind === "relay")).toBe(true);
  });

  it("on a site with no positions the overview is all zeros and the retained share is null", async () => {
    const other = server.client();
    await other.signIn(fx.crew.outsider.email);
    const r = await other.get(`/api/sites/${fx.otherSiteId}/overview`);
    expect(r.status).toBe(200);
    expect(r.body.totals).toEqual({
      positions: 0,
      surveyed: 0,
      bySurveyState: { not_surveyed: 0, inspected: 0, decided: 0 },
    });
    expect(r.body.originalRetainedPercent).toBeNull();
  });
});

describe("tile counts and deletions", () => {
  it("a tile counts the position's photos that are not deleted and its defects that are neither closed nor won't-fix", async () => {
    const board = await newBoard();
    const { position, component } = await newPosition(board.id, { designation: "C-1" });
    const photo = {
      siteId: fx.siteId,
      boardId: board.id,
      positionId: position.id,
      format: "jpeg",
      width: 10,
      height: 10,
      bytes: 100,
      originalKey: "o",
      displayKey: "d",
      thumbKey: "t",
    };
    await t.db
      .insertInto("photos")
      .values([photo, photo, { ...photo, deletedAt: new Date() }])
      .execute();
    const defect = {
      siteId: fx.siteId,
      boardId: board.id,
      positionId: position.id,
      componentId: component.id,
      title: "Rust",
      category: "corrosion" as const,
      severity: "degraded" as const,
    };
    await t.db
      .insertInto("defects")
      .values([
        { ...defect, status: "raised" },
        { ...defect, status: "under_repair" },
        { ...defect, status: "closed" },
        { ...defect, status: "accepted_as_is" },
      ])
      .execute();
    const tile = (await as.viewer.get(`${base}/boards/${board.id}`)).body.positions[0];
    expect([tile.photoCount, tile.openDefectCount]).toEqual([2, 2]);
    const detail = (await as.viewer.get(`${base}/positions/${position.id}`)).body;
    expect([detail.photoCount, detail.openDefectCount]).toEqual([2, 2]);
  });

  it("when a section is deleted its positions stay on the board without a section; a deleted position is gone but its audit remains", async () => {
    const board = await newBoard();
    const s = (await as.curator.post(`${base}/boards/${board.id}/sections`, { name: "Doomed" })).body;
    const { position } = await newPosition(board.id, { sectionId: s.id });
    expect((await as.curator.del(`${base}/sections/${s.id}?version=1`)).status).toBe(204);
    expect((await as.viewer.get(`${base}/positions/${position.id}`)).body.position.sectionId).toBeNull();
    expect((await as.curator.del(`${base}/positions/${position.id}?version=7`)).status).toBe(409);
    expect((await as.curator.del(`${base}/positions/${position.id}?version=1`)).status).toBe(204);
    expect((await as.viewer.get(`${base}/positions/${position.id}`)).status).toBe(404);
    const audit = await t.db
      .selectFrom("auditLog")
      .select(["action", "before"])
      .where("positionId", "=", position.id)
      .orderBy("id")
      .execute();
    expect(audit.map((a) => a.action)).toEqual(["create", "delete"]);
    expect(audit[1].before).toMatchObject({ id: position.id, component: { positionId: position.id } });
  });
});
