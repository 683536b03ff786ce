import { icuDay } from "../helpers/icu";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew, makeUser } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { memoryMailer } from "../../server/mail/mailer";
import { sendOverdueWatchNotices } from "../../server/return-to-service/overdue";
import * as rts from "../../server/return-to-service/service";
import { clockNote } from "../../src/domain/device-clock";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let boardId: string;
let sectionId: string;
const comp: Record<string, string> = {};
const pos: Record<string, string> = {};
const as: Record<string, Client> = {};
let qp2: { id: string; email: string };

const site = () => `/api/sites/${fx.siteId}`;
const hour = 3_600_000;
const ago = (h: number) => new Date(Date.now() - h * hour).toISOString();

async function makeBoard(siteId: string) {
  const db = t.db;
  const board = await db
    .insertInto("boards")
    .values({ siteId, name: "Main switchboard", nominalVolts: 450 })
    .returning("id")
    .executeTakeFirstOrThrow();
  const section = await db
    .insertInto("sections")
    .values({ siteId, boardId: board.id, name: "Power distribution" })
    .returning("id")
    .executeTakeFirstOrThrow();
  const other = await db
    .insertInto("sections")
    .values({ siteId, boardId: board.id, name: "Lighting" })
    .returning("id")
    .executeTakeFirstOrThrow();
  let col = 0; // one grid cell per position (exclusion constraint, migration 2026_12_02_0220)
  const mk = async (designation: string, circuit: string, sec: string, year: number) => {
    const p = await db
      .insertInto("positions")
      .values({
        siteId,
        boardId: board.id,
        sectionId: sec,
        designation,
        kind: "molded_case_breaker",
        gridRow: 1,
        gridCol: ++col,
        circuit,
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    pos[designation] = p.id;
    comp[designation] = (
      await db
        .insertInto("components")
        .values({ siteId, positionId: p.id, kind: "molded_case_breaker", poles: 3, voltageRating: 500, year })
        .returning("id")
        .executeTakeFirstOrThrow()
    ).id;
  };
  await mk("1-1", "Steering gear", section.id, 1946);
  await mk("1-2", "Fire pump", section.id, 1946);
  await mk("4-1", "Engine-room lighting", other.id, 1955);
  const galley = await db
    .insertInto("sections")
    .values({ siteId, boardId: board.id, name: "Galley" })
    .returning("id")
    .executeTakeFirstOrThrow();
  await mk("5-1", "Galley range", galley.id, 1955);
  return { boardId: board.id, sectionId: section.id };
}

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  ({ boardId, sectionId } = await makeBoard(fx.siteId));
  qp2 = await makeUser(t.db, { siteId: fx.siteId, role: "curator", name: "Second Qualified" });
  for (const role of ["curator", "volunteer", "photographer", "scrounger", "viewer", "admin", "outsider"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
  as.qp2 = server.client();
  await as.qp2.signIn(qp2.email);
  await qualify(fx.crew.curator.id);
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

const megger = (designation: string, megohms: number, measuredAt = ago(2)) =>
  as.volunteer.post(`${site()}/boards/${boardId}/insulation-readings`, {
    componentId: comp[designation],
    testVoltsDc: 1000,
    megohms,
    conductors: "A-G",
    equipmentTempC: 20,
    measuredAt,
  });
const view = async () => (await as.viewer.get(`${site()}/boards/${boardId}/return-to-service`)).body;
const stageOf = async (id: string) => (await view()).stages.find((s: any) => s.id === id);
const stepId = (stage: any, kind: string) => stage.steps.find((s: any) => s.kind === kind).id;
const sign = (who: string, stage: any, kind: string, extra: Record<string, unknown> = {}) =>
  as[who].post(`${site()}/return-to-service/steps/${stepId(stage, kind)}/signoffs`, {
    attempt: stage.attempt,
    ...extra,
  });

async function qualify(userId: string, expiresOn: string | null = "2099-12-31") {
  const r = await as.curator.put(`${site()}/return-to-service/qualified-persons/${userId}`, {
    qualification: "Marine electrician (fictional licence)",
    expiresOn,
    version: 0,
  });
  expect(r.status).toBe(200);
}

/** A stage a curator may plan, as the form sends it. */
const stageBody = () => ({
  name: "Power distribution from the temporary feed",
  sectionIds: [sectionId],
  supply: "temporary_fused",
  protectionDevice: "Fused disconnect",
  protectionRatingA: 20,
  protectionLimitA: 30,
  voltageStep: "full",
  stepVolts: 450,
  qualifiedPersonId: fx.crew.curator.id,
  watchHours: 8,
  checkEveryHours: 2,
});

async function newStage(body: Record<string, unknown> = {}) {
  const r = await as.curator.post(`${site()}/boards/${boardId}/return-to-service/stages`, {
    ...stageBody(),
    ...body,
  });
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  return r.body.stage;
}

/** Signs every hold point up to and including energise; returns the live stage. */
async function energise(stage: any) {
  for (const kind of ["isolate", "insulation", "defects", "protection", "clearance"]) {
    const r = await sign("volunteer", stage, kind);
    expect(r.status, `${kind}: ${JSON.stringify(r.body)}`).toBe(201);
  }
  const r = await sign("curator", stage, "energise", { at: ago(1) });
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  return r.body.stage;
}

describe("roles", () => {
  it("when a viewer, photographer or scrounger plans a stage, it gets 403; an outsider gets 404", async () => {
    for (const who of ["viewer", "photographer", "scrounger"])
      expect((await as[who].post(`${site()}/boards/${boardId}/return-to-service/stages`, { name: "x" })).status).toBe(
        403,
      );
    expect((await as.outsider.get(`${site()}/boards/${boardId}/return-to-service`)).status).toBe(404);
  });
  it("every member reads the board's return to service", async () => {
    for (const who of ["viewer", "photographer", "scrounger", "volunteer"])
      expect((await as[who].get(`${site()}/boards/${boardId}/return-to-service`)).status).toBe(200);
  });
  it("bad input gets a 400 with the field, never a 500", async () => {
    const r = await as.curator.post(`${site()}/boards/${boardId}/return-to-service/stages`, {
      name: "S",
      supply: "mains",
      voltageStep: "full",
    });
    expect(r.status).toBe(400);
    expect(r.body.error.fields).toHaveProperty("supply");
  });
  it("text PostgreSQL cannot store (a NUL byte, a lone surrogate) gets a 400 naming the field, and nothing is written", async () => {
    const url = `${site()}/boards/${boardId}/return-to-service/stages`;
    const before = (await as.viewer.get(`${site()}/boards/${boardId}/return-to-service`)).body.stages.length;
    for (const [field, value] of [
      ["name", "Steering\u0000 gear"],
      ["protectionDevice", "Fused \ud800disconnect"],
      ["notes", "dry\u0000"],
    ] as const) {
      const r = await as.curator.post(url, { ...stageBody(), [field]: value });
      expect(r.status, `${field}: ${JSON.stringify(r.body)}`).toBe(400);
      expect(r.body.error.fields, `${field}: ${JSON.stringify(r.body)}`).toHaveProperty(field);
    }
    const tag = await as.viewer.get(`/api/tags/${encodeURIComponent("T-\u0000")}`);
    expect(tag.status).toBe(400);
    expect((await as.viewer.get(`${site()}/boards/${boardId}/return-to-service`)).body.stages.length).toBe(before);
  });
});

describe("the plan and its gate", () => {
  it("a new stage takes the template's hold points and shows each blocker with a link", async () => {
    const s = await newStage({ qualifiedPersonId: null, protectionRatingA: 40 });
    expect(s.steps.map((x: any) => x.kind)).toEqual([
      "isolate",
      "insulation",
      "defects",
      "protection",
      "clearance",
      "energise",
      "ground_lamps",
      "thermal",
      "watch",
      "release",
    ]);
    expect(s.gate.state).toBe("blocked");
    const codes = s.gate.blockers.map((b: any) => b.code);
    expect(codes).toEqual(
      expect.arrayContaining(["insulation_missing", "protection_above_limit", "no_qualified_person"]),
    );
    const ir = s.gate.blockers.find((b: any) => b.code === "insulation_missing");
    expect(ir.href).toBe(`/sites/${fx.siteId}/readings/components/${comp["1-1"]}`);
    await as.curator.del(`${site()}/return-to-service/stages/${s.id}`);
  });

  it("a stage cannot be moved ahead of the stage it depends on (409)", async () => {
    const a = await newStage({ name: "First" });
    const b = await newStage({ name: "Second", dependsOnId: a.id });
    const r = await as.curator.post(`${site()}/return-to-service/stages/${b.id}/move`, { toIndex: 0 });
    expect(r.status).toBe(409);
    expect(r.body.error.message).toContain("depends on");
    for (const s of [b, a])
      expect((await as.curator.del(`${site()}/return-to-service/stages/${s.id}`)).status).toBe(204);
  });

  it("a blocked hold point cannot be signed (409 with the reasons); the curator releases it with a reason, shown for ever", async () => {
    const s = await newStage({ name: "Release test", sectionIds: [], positionIds: [pos["4-1"]] });
    expect((await sign("volunteer", s, "isolate")).status).toBe(201);
    const blocked = await sign("volunteer", s, "insulation");
    expect(blocked.status).toBe(409);
    expect(blocked.body.error.message).toContain("4-1");
    expect(
      (
        await sign("volunteer", s, "insulation", {
          kind: "released",
          reason: "Spare feeder, cable disconnected at the terminals.",
        })
      ).status,
    ).toBe(403);
    const short = await sign("curator", s, "insulation", { kind: "released", reason: "short" });
    expect(short.status).toBe(400);
    // signBody itself asks for the sentence, so the form says it beside the reason before sending.
    expect(short.body.error.fields.reason).toContain("at least a sentence");
    const ok = await sign("curator", s, "insulation", {
      kind: "released",
      reason: "Spare feeder, cable disconnected at the terminals.",
    });
    expect(ok.status).toBe(201);
    expect(ok.body.stage.gate.releasedWithReason).toEqual([
      expect.objectContaining({ reason: "Spare feeder, cable disconnected at the terminals." }),
    ]);
    const events = (await view()).events.filter((e: any) => e.kind === "signoff" && e.alert);
    expect(events[0].title).toContain("Released with reason");
  });
});

describe("entries overtaken before the energisation", () => {
  const supersede = (who: string, entryId: string, body: Record<string, unknown>) =>
    as[who].post(`${site()}/return-to-service/signoffs/${entryId}/supersede`, body);
  const entryOf = (stage: any, kind: string) =>
    stage.steps
      .find((x: any) => x.kind === kind)
      .entries.filter((e: any) => !e.supersededBy)
      .at(-1);
  const hold = (stage: any, kind: string) => stage.gate.holdPoints.find((h: any) => h.kind === kind);

  it("a change of protection or scope after hold points were signed strikes them out, with the reason, and audits it", async () => {
    await megger("1-1", 500);
    await megger("1-2", 400);
    const s = await newStage({ name: "Scope change test" });
    for (const kind of ["isolate", "insulation", "defects", "protection", "clearance"])
      expect((await sign("volunteer", s, kind, { note: kind === "protection" ? "20 A fuses" : "" })).status).toBe(201);
    let now = await stageOf(s.id);
    expect(now.gate.state).toBe("ready_to_energise");

    // The words of the stage are not its scope: nothing is voided.
    const named = await as.curator.patch(`${site()}/return-to-service/stages/${s.id}`, {
      name: "Scope change test, renamed",
      version: now.version,
    });
    expect(named.status, JSON.stringify(named.body)).toBe(200);
    now = await stageOf(s.id);
    expect(now.gate.state).toBe("ready_to_energise");

    const r = await as.curator.patch(`${site()}/return-to-service/stages/${s.id}`, {
      protectionRatingA: 25,
      positionIds: [pos["4-1"]],
      version: now.version,
    });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    now = await stageOf(s.id);
    for (const kind of ["isolate", "insulation", "defects", "protection", "clearance"]) {
      const e = entryOf(now, kind);
      expect(e.kind).toBe("struck");
      expect(e.reason).toBe(
        "Voided: the stage's positions, protection rating changed after this was signed. Check and sign it again.",
      );
    }
    expect(hold(now, "isolate").state).toBe("ready");
    expect(now.gate.state).not.toBe("ready_to_energise");
    // Signed again, each entry continues its chain after the strike.
    const again = await sign("volunteer", now, "isolate", { note: "Isolated again at the shore box" });
    expect(again.status, JSON.stringify(again.body)).toBe(201);
    const chain = again.body.stage.steps.find((x: any) => x.kind === "isolate").entries;
    expect(chain.map((e: any) => e.kind)).toEqual(["signed", "struck", "signed"]);
    expect(chain[2].supersedesId).toBe(chain[1].id);
    expect(hold(again.body.stage, "isolate").state).toBe("met");
    const audit = await t.db
      .selectFrom("auditLog")
      .select("after")
      .where("entityId", "=", s.id)
      .where("action", "=", "update")
      .orderBy("id")
      .execute();
    expect(audit.map((a: any) => a.after.voidedEntries ?? 0)).toEqual([0, 5]);
    await as.curator.del(`${site()}/return-to-service/stages/${s.id}`);
  });

  it("a new signature in place of a release passes the gate as a first one would; a release covers only what it saw", async () => {
    // A position of its own, so the defects raised here touch no other test.
    const spare = (
      await t.db
        .insertInto("positions")
        .values({
          siteId: fx.siteId,
          boardId,
          designation: "6-1",
          kind: "molded_case_breaker",
          gridRow: 2,
          gridCol: 1,
          circuit: "Laundry",
        })
        .returning("id")
        .executeTakeFirstOrThrow()
    ).id;
    await t.db
      .insertInto("components")
      .values({
        siteId: fx.siteId,
        positionId: spare,
        kind: "molded_case_breaker",
        poles: 3,
        voltageRating: 500,
        year: 1955,
      })
      .execute();
    const s = await newStage({ name: "Supersede test", sectionIds: [], positionIds: [spare] });
    expect((await sign("volunteer", s, "isolate")).status).toBe(201);
    const rel = await sign("curator", s, "insulation", {
      kind: "released",
      reason: "Galley range disconnected at its isolator.",
    });
    expect(rel.status).toBe(201);
    const released = entryOf(rel.body.stage, "insulation");

    // A volunteer cannot turn the release into a plain signature while the reading is still missing.
    const turned = await supersede("volunteer", released.id, { kind: "signed", reason: "Looks fine to me" });
    expect(turned.status).toBe(409);
    expect(turned.body.error.code).toBe("blocked");
    expect(turned.body.error.message).toContain("6-1");
    expect(hold(await stageOf(s.id), "insulation").state).toBe("released");
    // Nor is a hold point that nothing blocks "released".
    const iso = entryOf(await stageOf(s.id), "isolate");
    expect(
      (await supersede("curator", iso.id, { kind: "released", reason: "Released for no reason at all" })).body.error
        .code,
    ).toBe("not_blocked");

    // A safety-critical defect raised on the stage after the release blocks again: the release did not see it.
    const d = await as.curator.post(`${site()}/defects`, {
      positionId: spare,
      title: "Burnt terminal on the range feeder",
      severity: "impaired",
      category: "wiring",
      boardId,
      safetyCritical: true,
      blocksEnergisation: true,
    });
    expect(d.status, JSON.stringify(d.body)).toBe(201);
    const blocked = await stageOf(s.id);
    const defects = hold(blocked, "defects");
    expect(defects.state).toBe("blocked");
    expect(defects.overtaken).toBe(false);
    // Sign "defects" is refused; release the defects hold point, then the defect appears on another position…
    const relD = await sign("curator", blocked, "defects", {
      kind: "released",
      reason: "Terminal replaced, defect kept open for the photo.",
    });
    expect(relD.status).toBe(201);
    expect(hold(relD.body.stage, "defects").state).toBe("released");
    const d2 = await as.curator.post(`${site()}/defects`, {
      positionId: spare,
      title: "Cracked arc chute on the range breaker",
      severity: "impaired",
      category: "wiring",
      boardId,
      safetyCritical: true,
      blocksEnergisation: true,
    });
    expect(d2.status).toBe(201);
    const after = hold(await stageOf(s.id), "defects");
    expect(after).toMatchObject({ state: "blocked", overtaken: true });
    expect(after.blockers.map((b: any) => b.message)).toEqual([expect.stringContaining("Cracked arc chute")]);
    // The curator releases again, with a reason that covers both; the new release supersedes the old.
    const again = await supersede("curator", entryOf(await stageOf(s.id), "defects").id, {
      kind: "released",
      reason: "Arc chute replaced from salvage; both defects kept open for their photos.",
    });
    expect(again.status, JSON.stringify(again.body)).toBe(201);
    expect(hold(again.body.stage, "defects").state).toBe("released");
  });
});

describe("sign-offs", () => {
  let stage: any;
  beforeAll(async () => {
    await qualify(qp2.id);
    await megger("1-1", 500);
    await megger("1-2", 400);
    stage = await newStage({ name: "Sign-off stage" });
  });

  it("when two people sign the same hold point at once, one wins and the other gets 409 with the current state", async () => {
    const [a, b] = await Promise.all([sign("volunteer", stage, "isolate"), sign("curator", stage, "isolate")]);
    expect([a.status, b.status].sort()).toEqual([201, 409]);
    const lost = a.status === 409 ? a : b;
    expect(lost.body.error.current.steps.find((x: any) => x.kind === "isolate").entries).toHaveLength(1);
  });

  it("a signature cannot be edited or deleted (405); a superseding entry corrects it", async () => {
    const s = await stageOf(stage.id);
    const entry = s.steps.find((x: any) => x.kind === "isolate").entries[0];
    expect(
      (await as.curator.patch(`${site()}/return-to-service/signoffs/${entry.id}`, { note: "changed" })).status,
    ).toBe(405);
    expect((await as.curator.del(`${site()}/return-to-service/signoffs/${entry.id}`)).status).toBe(405);
    // The database refuses too.
    await expect(
      t.db.updateTable("rtsSignoffs").set({ note: "x" }).where("id", "=", entry.id).execute(),
    ).rejects.toThrow(/cannot be changed/);
    const r = await as.curator.post(`${site()}/return-to-service/signoffs/${entry.id}/supersede`, {
      kind: "signed",
      reason: "Wrong isolation point written first",
      note: "Isolated at the shore box",
    });
    expect(r.status).toBe(201);
    const entries = r.body.stage.steps.find((x: any) => x.kind === "isolate").entries;
    expect(entries).toHaveLength(2);
    expect(entries[0].supersededBy).toBe(entries[1].id);
    expect(r.body.stage.gate.holdPoints[0].state).toBe("met");
    const again = await as.curator.post(`${site()}/return-to-service/signoffs/${entry.id}/supersede`, {
      kind: "struck",
      reason: "Second correction of the same entry",
    });
    expect(again.status).toBe(409);
  });

  it("only a qualified person signs the energise step", async () => {
    let s = await stageOf(stage.id);
    for (const kind of ["insulation", "defects", "protection", "clearance"])
      expect((await sign("volunteer", s, kind)).status).toBe(201);
    s = await stageOf(stage.id);
    const byVolunteer = await sign("volunteer", s, "energise");
    expect(byVolunteer.status).toBe(403);
    const r = await sign("qp2", s, "energise", { at: ago(3) });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    expect(r.body.stage.status).toBe("energised");
    expect(r.body.stage.gate.state).toBe("live");
    expect((await view()).events.some((e: any) => e.kind === "energise" && e.stageId === stage.id)).toBe(true);
    // The stage was energised on its entries: one is corrected by a new entry, not struck out.
    const prot = r.body.stage.steps.find((x: any) => x.kind === "protection").entries.at(-1);
    const struck = await as.curator.post(`${site()}/return-to-service/signoffs/${prot.id}/supersede`, {
      kind: "struck",
      reason: "Wrong fuse rating written",
    });
    expect(struck.status).toBe(409);
    expect(struck.body.error.code).toBe("in_effect");
  });

  it("a qualification past its expiry no longer signs", async () => {
    await as.curator.put(`${site()}/return-to-service/qualified-persons/${qp2.id}`, {
      qualification: "Expired",
      expiresOn: "2020-01-01",
      version: 1,
    });
    const s = await stageOf(stage.id);
    expect((await sign("qp2", s, "release")).status).toBe(403);
    expect(
      (await as.curator.get(`${site()}/return-to-service/qualified-persons`)).body.people.find(
        (p: any) => p.userId === qp2.id,
      ).current,
    ).toBe(false);
  });

  it("a watch check is overdue after its interval; the qualified person gets one e-mail per overdue check", async () => {
    const mailer = memoryMailer();
    const r1 = await sendOverdueWatchNotices({ db: t.db, mailer, publicUrl: "http://tideline.test" }, new Date());
    const r2 = await sendOverdueWatchNotices({ db: t.db, mailer, publicUrl: "http://tideline.test" }, new Date());
    expect(r1.sent).toBe(1);
    expect(r2.sent).toBe(0);
    expect(mailer.sent).toHaveLength(1);
    expect(mailer.sent[0].to).toBe(fx.crew.curator.email);
    expect(mailer.sent[0].subject).toContain("Watch check overdue");
    const s = await stageOf(stage.id);
    expect(s.watch.overdueSince).not.toBeNull();
  });

  it("no overdue e-mail goes to a qualified person whose account is suspended; the notice says why", async () => {
    const away = await makeUser(t.db, { siteId: fx.siteId, role: "curator", name: "Suspended electrician" });
    await t.db
      .updateTable("users")
      .set({ suspendedAt: new Date(), suspendedReason: "Licence under review" })
      .where("id", "=", away.id)
      .execute();
    const live = await t.db
      .insertInto("rtsStages")
      .values({
        siteId: fx.siteId,
        boardId,
        sortOrder: 99,
        name: "Galley feeders under watch",
        supply: "temporary_fused",
        voltageStep: "full",
        status: "energised",
        energisedAt: new Date(Date.now() - 5 * hour),
        watchHours: 24,
        checkEveryHours: 1,
        qualifiedPersonId: away.id,
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    const mailer = memoryMailer();
    await sendOverdueWatchNotices({ db: t.db, mailer, publicUrl: "http://tideline.test" }, new Date());
    expect(mailer.sent.filter((m) => m.to === (away as { email: string }).email)).toEqual([]);
    const notice = await t.db
      .selectFrom("rtsOverdueNotices")
      .select(["outcome", "sentTo"])
      .where("stageId", "=", live.id)
      .executeTakeFirstOrThrow();
    expect(notice).toEqual({ outcome: "suspended", sentTo: away.id });
    await t.db.deleteFrom("rtsStages").where("id", "=", live.id).execute();
  });

  it("volunteers record watch checks; viewers cannot (403)", async () => {
    expect(
      (await as.viewer.post(`${site()}/return-to-service/stages/${stage.id}/watch-checks`, { lamps: "equal" })).status,
    ).toBe(403);
    const r = await as.volunteer.post(`${site()}/return-to-service/stages/${stage.id}/watch-checks`, {
      lamps: "equal",
      warmToHand: true,
      note: "Quiet",
    });
    expect(r.status).toBe(201);
    expect(r.body.incidents).toEqual([]);
    expect((await stageOf(stage.id)).watch.overdueSince).toBeNull();
  });

  it("a watch check kept on a phone: the server keeps the phone's time and its own, corrects a clock that is off, refuses the impossible", async () => {
    // The outbox sends Tideline-Device-Time (what the phone's clock reads as it sends) with every item.
    const url = `${site()}/return-to-service/stages/${stage.id}/watch-checks`;
    const min = 60_000;
    const send = (body: Record<string, unknown>, deviceNow?: Date | string) =>
      as.volunteer.call(
        "POST",
        url,
        body,
        deviceNow
          ? { "Tideline-Device-Time": String(deviceNow instanceof Date ? deviceNow.toISOString() : deviceNow) }
          : {},
      );
    const row = (id: string) =>
      t.db.selectFrom("rtsWatchChecks").selectAll().where("id", "=", id).executeTakeFirstOrThrow();

    // Kept on the phone for 40 minutes; the phone's clock is right: its time stands, the server's receipt is its own.
    const observed = new Date(Date.now() - 40 * min);
    const late = await send({ lamps: "equal", note: "Late but right", at: observed.toISOString() }, new Date());
    expect(late.status, JSON.stringify(late.body)).toBe(201);
    const r1 = await row(late.body.check.id);
    expect(r1.at.getTime()).toBe(observed.getTime());
    expect(r1.deviceAt!.getTime()).toBe(observed.getTime());
    expect(Math.abs(r1.clockSkewS!)).toBeLessThan(5);
    expect(r1.createdAt.getTime()).toBeGreaterThan(Date.now() - min);

    // The phone's clock is 25 minutes fast: what it said is kept, the check counts at the time on the server's clock.
    const fast = 25 * min;
    const seenOnPhone = new Date(Date.now() - 30 * min + fast);
    const skewed = await send(
      { lamps: "equal", note: "Fast clock", at: seenOnPhone.toISOString() },
      new Date(Date.now() + fast),
    );
    expect(skewed.status, JSON.stringify(skewed.body)).toBe(201);
    const r2 = await row(skewed.body.check.id);
    expect(r2.deviceAt!.getTime()).toBe(seenOnPhone.getTime());
    expect(Math.round(r2.clockSkewS! / 60)).toBe(25);
    expect(Math.abs(r2.at.getTime() - (seenOnPhone.getTime() - fast))).toBeLessThan(5_000);

    // The log shows it: the phone's clock, what it said, and that it waited on the phone.
    const events = (await view()).events.filter((e: any) => e.kind === "watch_check");
    const shown = events.find((e: any) => e.id === r2.id);
    expect(shown.clock).toMatchObject({ deviceAt: seenOnPhone.toISOString(), skewS: r2.clockSkewS });
    expect(clockNote(shown, (iso) => iso.slice(11, 16))).toMatch(
      /^phone's clock 25 min ahead: it said \d\d:\d\d, shown on the server's clock; kept on the phone, received \d\d:\d\d$/,
    );
    expect(
      clockNote(
        events.find((e: any) => e.id === r1.id),
        (iso) => iso,
      ),
    ).toMatch(/^kept on the phone, received /);

    const before = await t.db
      .selectFrom("rtsWatchChecks")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .executeTakeFirstOrThrow();
    // A time in the future (by the server's clock; the phone's agrees) is refused, with the reason on the field.
    const future = await send({ lamps: "equal", at: new Date(Date.now() + 30 * min).toISOString() }, new Date());
    expect(future.status).toBe(400);
    expect(future.body.error.fields.at).toBe("That time is in the future.");
    // Without the header (an API client) the time is taken as given, and a future one is still refused.
    expect((await send({ lamps: "equal", at: new Date(Date.now() + 10 * min).toISOString() })).status).toBe(400);
    // A phone whose clock is two days out is set wrongly, not drifting: refused, the person sets it.
    const wrongDate = await send(
      { lamps: "equal", at: new Date(Date.now() - 2 * 24 * 60 * min).toISOString() },
      new Date(Date.now() - 2 * 24 * 60 * min),
    );
    expect(wrongDate.status).toBe(400);
    expect(wrongDate.body.error.fields.at).toMatch(/phone's clock is 2 days behind/);
    // Before the stage was energised (3 h ago): not a check of this energisation.
    const early = await send({ lamps: "equal", at: new Date(Date.now() - 5 * 60 * min).toISOString() }, new Date());
    expect(early.status).toBe(400);
    expect(early.body.error.fields.at).toMatch(/before the stage was energised/);
    // An unreadable header is bad input, not ignored.
    const garbled = await send({ lamps: "equal" }, "yesterday-ish");
    expect(garbled.status).toBe(400);
    expect(garbled.body.error.message).toContain("Tideline-Device-Time");
    const after = await t.db
      .selectFrom("rtsWatchChecks")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n));
  });

  it("a dark lamp in a watch check opens a safety-critical, blocking defect and stops the stage", async () => {
    const r = await as.volunteer.post(`${site()}/return-to-service/stages/${stage.id}/watch-checks`, {
      lamps: "one_dark",
      lampPhase: "B",
      note: "B lamp out",
    });
    expect(r.status).toBe(201);
    expect(r.body.incidents).toHaveLength(1);
    const defect = (await as.viewer.get(`${site()}/defects/${r.body.incidents[0].defectId}`)).body;
    const d = defect.defect ?? defect;
    expect(d).toMatchObject({ safetyCritical: true, blocksEnergisation: true, status: "raised" });
    const s = await stageOf(stage.id);
    expect(s.status).toBe("stopped");
    expect(s.gate.state).toBe("stopped");
    expect(s.gate.holdPoints.find((h: any) => h.kind === "release").blockers[0].code).toBe("stopped");
  });

  it("a stopped stage is started again only after it is de-energised; the new attempt needs every hold point again", async () => {
    let s = await stageOf(stage.id);
    expect(
      (
        await as.curator.post(`${site()}/return-to-service/stages/${stage.id}/restart`, {
          reason: "Ground traced and cleared",
          version: s.version,
        })
      ).status,
    ).toBe(409);
    expect(
      (
        await as.volunteer.post(`${site()}/return-to-service/stages/${stage.id}/de-energise`, {
          note: "Opened the temporary feed",
        })
      ).status,
    ).toBe(201);
    s = await stageOf(stage.id);
    const r = await as.curator.post(`${site()}/return-to-service/stages/${stage.id}/restart`, {
      reason: "Ground traced and cleared",
      version: s.version,
    });
    expect(r.status).toBe(200);
    expect(r.body.stage.attempt).toBe(2);
    expect(r.body.stage.gate.holdPoints.every((h: any) => h.signoff === null)).toBe(true);
    // The open incident defect on the stage's positions? It has no position: it blocks through the ground lamps instead.
    expect(r.body.stage.gate.blockers.map((b: any) => b.code)).toContain("ground_shown");
  });
});

describe("readings on a live stage", () => {
  it("a thermal level 4 recorded on a live stage's position opens a defect by itself and stops the stage", async () => {
    await megger("4-1", 600);
    const s = await newStage({ name: "Lighting", sectionIds: [], positionIds: [pos["4-1"]] });
    // A clean lamp check after the dark one, so the gate lets this stage go.
    await as.curator.post(`${site()}/boards/${boardId}/ground-checks`, {
      lineVolts: 450,
      lamps: { A: "bright", B: "bright", C: "bright" },
      measuredAt: new Date().toISOString(),
    });
    const live = await energise(await stageOf(s.id));
    expect(live.status).toBe("energised");
    const r = await as.volunteer.post(`${site()}/components/${comp["4-1"]}/thermal-scans`, {
      componentTempC: 80,
      ambientTempC: 25,
      measuredAt: new Date().toISOString(),
    });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    const after = await stageOf(s.id);
    expect(after.status).toBe("stopped");
    const defects = await t.db
      .selectFrom("defects")
      .select(["id", "title", "safetyCritical", "blocksEnergisation", "positionId"])
      .where("positionId", "=", pos["4-1"])
      .execute();
    expect(defects).toEqual([expect.objectContaining({ safetyCritical: true, blocksEnergisation: true })]);
    expect(defects[0].title).toContain("Thermal level 4");
    const ev = (await as.viewer.get(`${site()}/defects/${defects[0].id}/evidence`)).body;
    expect(ev.linked).toEqual([expect.objectContaining({ readingKind: "thermal", role: "raised_from" })]);
  });
  it("an insulation reading below the minimum on a live stage's position opens a defect by itself, linked to the reading both ways, and stops the stage", async () => {
    await megger("5-1", 600);
    const s = await newStage({ name: "Galley", sectionIds: [], positionIds: [pos["5-1"]] });
    await as.curator.post(`${site()}/boards/${boardId}/ground-checks`, {
      lineVolts: 450,
      lamps: { A: "bright", B: "bright", C: "bright" },
      measuredAt: new Date().toISOString(),
    });
    const live = await energise(await stageOf(s.id));
    expect(live.status).toBe("energised");
    // 0.05 MΩ: far below ANSI/NETA MTS-2019 Table 100.1's 100 MΩ for the 600 V class (from memory, see tests/domain).
    const r = await megger("5-1", 0.05, new Date().toISOString());
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    expect((await stageOf(s.id)).status).toBe("stopped");
    const defects = await t.db
      .selectFrom("defects")
      .select(["id", "title", "safetyCritical", "blocksEnergisation"])
      .where("positionId", "=", pos["5-1"])
      .execute();
    expect(defects).toEqual([expect.objectContaining({ safetyCritical: true, blocksEnergisation: true })]);
    expect(defects[0].title).toContain("Insulation below the minimum on 5-1");
    const ev = (await as.viewer.get(`${site()}/defects/${defects[0].id}/evidence`)).body;
    expect(ev.linked).toEqual([
      expect.objectContaining({
        readingKind: "insulation",
        readingId: r.body.reading.id,
        role: "raised_from",
        verdict: "below_minimum",
      }),
    ]);
    const links = (await as.viewer.get(`${site()}/boards/${boardId}/reading-defects`)).body.links;
    expect(links).toEqual(
      expect.arrayContaining([expect.objectContaining({ readingId: r.body.reading.id, defectId: defects[0].id })]),
    );
  });
  it("a low reading on a board with nothing live opens no defect", async () => {
    const before = await t.db
      .selectFrom("defects")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .executeTakeFirstOrThrow();
    expect((await megger("1-2", 0.05)).status).toBe(201);
    const after = await t.db
      .selectFrom("defects")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n));
  });
});

describe("breaker operations", () => {
  it("counts each operation against the default budget for a pre-1950 breaker and warns past it, never blocks", async () => {
    let last: any;
    for (let i = 0; i < 11; i++) {
      last = await as.volunteer.post(`${site()}/components/${comp["1-1"]}/breaker-operations`, {
        operation: i % 2 ? "open" : "close",
        why: "Exercise after rebuild",
      });
      expect(last.status).toBe(201);
    }
    expect(last.body.status).toMatchObject({ used: 11, budget: 10, overBudget: true });
    expect(last.body.status.warning).toContain("temporary supply");
    const b = (await view()).breakers.find((x: any) => x.componentId === comp["1-1"]);
    expect(b.status.remaining).toBe(-1);
  });
  it("the curator sets a budget (version-checked); a volunteer cannot", async () => {
    expect(
      (await as.volunteer.put(`${site()}/components/${comp["1-2"]}/operations-budget`, { budget: 4, version: 0 }))
        .status,
    ).toBe(403);
    expect(
      (
        await as.curator.put(`${site()}/components/${comp["1-2"]}/operations-budget`, {
          budget: 4,
          reason: "Arc chutes cracked",
          version: 0,
        })
      ).status,
    ).toBe(200);
    expect(
      (await as.curator.put(`${site()}/components/${comp["1-2"]}/operations-budget`, { budget: 5, version: 0 })).status,
    ).toBe(409);
  });
});

describe("a qualification counts on the site's own calendar", () => {
  // The reference for a zone's day: ICU's tz data (tests/helpers/icu.ts).
  // 20:00 UTC on 5 December is 09:00 on 6 December in Auckland (New Zealand daylight time, UTC+13).
  const evening = new Date("2026-12-05T20:00:00Z");
  const qp2Ctx = () => ({ siteId: fx.siteId, actor: { id: qp2.id, role: "curator" as const } });
  const setZone = async (timeZone: string) =>
    expect((await as.curator.put(`${site()}/time-zone`, { timeZone })).status).toBe(200);
  const lastDay = async (expiresOn: string) => {
    const me = (await as.curator.get(`${site()}/return-to-service/qualified-persons`)).body.people.find(
      (p: any) => p.userId === qp2.id,
    );
    const r = await as.curator.put(`${site()}/return-to-service/qualified-persons/${qp2.id}`, {
      qualification: "Marine electrician (fictional licence)",
      expiresOn,
      version: me.version,
    });
    expect(r.status, JSON.stringify(r.body)).toBe(200);
    return r.body.person;
  };
  /** A qualified-only hold point with no entry yet, and its stage's attempt. */
  const openQualifiedStep = async () => {
    for (const st of (await view()).stages)
      for (const step of st.steps)
        if (step.qualifiedOnly && !step.entries.some((e: any) => e.kind !== "struck"))
          return { stepId: step.id as string, attempt: st.attempt as number };
    throw new Error("no open qualified-only hold point");
  };
  let before = "UTC";
  beforeAll(async () => {
    before = (await t.db.selectFrom("sites").select("timeZone").where("id", "=", fx.siteId).executeTakeFirstOrThrow())
      .timeZone;
  });
  afterAll(() => setZone(before));

  it("refuses a qualified person's sign-off once the site's day is past the last day, though UTC's is not", async () => {
    expect(icuDay(evening, "UTC")).toBe("2026-12-05");
    expect(icuDay(evening, "Pacific/Auckland")).toBe("2026-12-06");
    await lastDay("2026-12-05");
    const { stepId, attempt } = await openQualifiedStep();
    const body = { kind: "signed" as const, reason: "", note: "", evidence: [], attempt };

    await setZone("Pacific/Auckland");
    await expect(rts.sign(t.db, qp2Ctx(), stepId, body, evening)).rejects.toMatchObject({
      status: 403,
      message: expect.stringContaining("current qualification"),
    });

    // The same instant on a site kept in UTC is still the last day: the qualification holds (whatever else the
    // hold point then asks, it is not refused for the qualification).
    await setZone("UTC");
    const onUtc = await rts.sign(t.db, qp2Ctx(), stepId, body, evening).then(
      () => null,
      (e: unknown) => e as { status?: number; message?: string },
    );
    expect(onUtc?.message ?? "").not.toContain("current qualification");
  });

  it("the crew page and the board say 'current' by the site's day", async () => {
    const zone = "Pacific/Kiritimati"; // UTC+14: its day is UTC's or the next
    await setZone(zone);
    const now = new Date();
    const siteDay = icuDay(now, zone);
    const dayBefore = icuDay(new Date(Date.parse(`${siteDay}T12:00:00Z`) - 86_400_000), "UTC");
    expect((await lastDay(dayBefore)).current).toBe(false);
    expect((await view()).qualifiedPersons.find((q: any) => q.userId === qp2.id).current).toBe(false);
    expect((await lastDay(siteDay)).current).toBe(true);
    expect((await view()).qualifiedPersons.find((q: any) => q.userId === qp2.id).current).toBe(true);
  });
});
