import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { makeBoard } from "./defects-fixtures";

// A failing reading raises a defect linked both ways; a repair closes on evidence
// (a re-test meeting its criterion or an after-work photo), verified by someone else.
let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let board: Awaited<ReturnType<typeof makeBoard>>;
const as: Record<string, Client> = {};

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  board = await makeBoard(t.db, fx.siteId);
  for (const role of ["curator", "volunteer", "viewer"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const site = () => `/api/sites/${fx.siteId}`;
const move = (c: Client, d: { id: string; version: number }, to: string) =>
  c.post(`${site()}/defects/${d.id}/status`, { to, version: d.version });
const insulation = async (megohms: number, componentId: string | null = board.positions[0].componentId) =>
  (
    await as.volunteer.post(`${site()}/boards/${board.boardId}/insulation-readings`, {
      componentId,
      ...(componentId ? {} : { circuit: "Feeder 3" }),
      testVoltsDc: 1000,
      megohms,
      conductors: "A-G",
      equipmentTempC: 20,
      measuredAt: "2026-11-20T09:00:00Z",
    })
  ).body.reading as { id: string; judgement: { verdict: string } };

async function toRetest(from: string | null = null) {
  const c = board.positions[0].componentId;
  let d = (
    await as.volunteer.post(`${site()}/defects`, {
      boardId: board.boardId,
      componentId: c,
      title: "Low insulation on the line side",
      category: "insulation",
      severity: "impaired",
      ...(from ? { fromReading: { kind: "insulation", id: from } } : {}),
    })
  ).body.defect;
  d = (await move(as.volunteer, d, "under_repair")).body.defect;
  d = (await move(as.volunteer, d, "awaiting_retest")).body.defect;
  expect(d.status).toBe("awaiting_retest");
  return d as { id: string; version: number; componentId: string };
}

describe("a defect raised from a failing reading", () => {
  it("links the reading both ways: the defect's evidence names it, the board's readings name the defect", async () => {
    const low = await insulation(0.4); // below ANSI/NETA MTS-2019 Table 100.1's 100 MΩ for the 600 V class
    expect(low.judgement.verdict).toBe("below_minimum");
    const d = await toRetest(low.id);
    const ev = (await as.viewer.get(`${site()}/defects/${d.id}/evidence`)).body;
    expect(ev.linked).toEqual([
      expect.objectContaining({
        readingKind: "insulation",
        readingId: low.id,
        role: "raised_from",
        verdict: "below_minimum",
      }),
    ]);
    const links = (await as.viewer.get(`${site()}/boards/${board.boardId}/reading-defects`)).body.links;
    expect(links).toEqual(
      expect.arrayContaining([expect.objectContaining({ readingId: low.id, defectId: d.id, role: "raised_from" })]),
    );
  });
});

describe("closing on evidence", () => {
  it("with no evidence the close is refused with 422 and the reason", async () => {
    const d = await toRetest();
    const r = await move(as.curator, d, "closed");
    expect(r.status).toBe(422);
    expect(r.body.error).toMatchObject({
      code: "evidence_required",
      message: expect.stringMatching(/re-test reading|after work/),
    });
  });

  it("a re-test that still fails is not evidence; one meeting its criterion is, and the close records the verifier", async () => {
    let d = await toRetest();
    const still = await insulation(0.8);
    expect(
      (
        await as.volunteer.post(`${site()}/defects/${d.id}/readings`, {
          readingKind: "insulation",
          readingId: still.id,
        })
      ).status,
    ).toBe(201);
    expect((await move(as.curator, d, "closed")).body.error.code).toBe("evidence_required");
    const good = await insulation(800);
    const linked = await as.volunteer.post(`${site()}/defects/${d.id}/readings`, {
      readingKind: "insulation",
      readingId: good.id,
      role: "retest",
    });
    expect(linked.body).toMatchObject({ retestsMeeting: 1 });
    d = (await as.curator.get(`${site()}/defects/${d.id}`)).body.defect;
    const closed = await move(as.curator, d, "closed");
    expect(closed.status).toBe(200);
    expect(closed.body.defect).toMatchObject({ status: "closed", verifiedBy: fx.crew.curator.id });
  });

  it("an after-work photo filed to the defect is evidence", async () => {
    const d = await toRetest();
    await t.db
      .insertInto("photos")
      .values({
        siteId: fx.siteId,
        boardId: board.boardId,
        defectId: d.id,
        kind: "after_work",
        format: "jpeg",
        width: 10,
        height: 10,
        bytes: 10,
        originalKey: `t/${d.id}`,
        displayKey: `t/${d.id}-d`,
        thumbKey: `t/${d.id}-t`,
        uploadedBy: fx.crew.curator.id,
      })
      .execute();
    expect((await move(as.curator, d, "closed")).status).toBe(200);
  });

  it("the repairer is not offered the close and the viewer cannot link evidence", async () => {
    const d = await toRetest();
    expect((await as.volunteer.get(`${site()}/defects/${d.id}`)).body.allowedTargets).not.toContain("closed");
    expect((await as.curator.get(`${site()}/defects/${d.id}`)).body.allowedTargets).toContain("closed");
    const good = await insulation(900);
    expect(
      (await as.viewer.post(`${site()}/defects/${d.id}/readings`, { readingKind: "insulation", readingId: good.id }))
        .status,
    ).toBe(403);
  });

  it("the curator who did the repair is neither offered nor allowed the close, even with a passing re-test (409 same_person)", async () => {
    let d = await toRetest();
    d = (await move(as.curator, d, "under_repair")).body.defect;
    d = (
      await as.curator.post(`${site()}/defects/${d.id}/status`, {
        to: "awaiting_retest",
        repairedBy: fx.crew.curator.id,
        version: d.version,
      })
    ).body.defect;
    const good = await insulation(700);
    await as.curator.post(`${site()}/defects/${d.id}/readings`, { readingKind: "insulation", readingId: good.id });
    const detail = (await as.curator.get(`${site()}/defects/${d.id}`)).body;
    expect(detail.defect.repairedBy).toBe(fx.crew.curator.id);
    expect(detail.allowedTargets).not.toContain("closed");
    const r = await move(as.curator, detail.defect, "closed");
    expect(r.status).toBe(409);
    expect(r.body.error).toMatchObject({ code: "same_person", message: expect.stringMatching(/someone other/i) });
  });

  it("a reading of another component cannot be linked (400)", async () => {
    const d = await toRetest();
    const other = board.positions.find((p) => p.componentId && p.componentId !== d.componentId);
    if (!other?.componentId) throw new Error("fixture needs a second component");
    const r = await insulation(900, other.componentId);
    const link = await as.volunteer.post(`${site()}/defects/${d.id}/readings`, {
      readingKind: "insulation",
      readingId: r.id,
    });
    expect(link.status).toBe(400);
  });
});
