/**
 * Condition survey report and tag labels, read back with tools from outside
 * the project: poppler-utils' pdftotext / pdfinfo / pdffonts / pdftoppm (Debian) and the
 * jsqr decoder (npm). The demo scenario is MV Kestrel Lantern (invented).
 */
import { icuDay } from "../helpers/icu";
import { execFile } from "node:child_process";
import { mkdtemp, readdir, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import jsQR from "jsqr";
import { sql } from "kysely";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seedDemo } from "../../server/seed/demo";
import { DEMO_PASSWORD } from "../../server/seed/people";
import { labelSheet, labelSlots } from "../../src/domain/label-sheets";
import { surveyReportQuery } from "../../src/schemas/reports";
import { loadSurveyData } from "../../server/reports/survey-data";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeSite, makeUser } from "../helpers/fixtures";
import { Client, startTestServer, TEST_PASSWORD, type TestServer } from "../helpers/http";

const run = promisify(execFile);

let t: TestDb;
let server: TestServer;
let viewer: Client;
let volunteer: Client;
let siteId: string;
let mainId: string;
let dir: string;

beforeAll(async () => {
  t = await createTestDb();
  await seedDemo(t.db);
  server = await startTestServer({ db: t.db });
  viewer = server.client();
  await viewer.signIn("viewer@tideline.test", DEMO_PASSWORD);
  volunteer = server.client();
  await volunteer.signIn("volunteer@tideline.test", DEMO_PASSWORD);
  siteId = (await t.db.selectFrom("sites").select("id").executeTakeFirstOrThrow()).id;
  mainId = (await t.db.selectFrom("boards").select("id").where("name", "like", "Main%").executeTakeFirstOrThrow()).id;
  dir = await mkdtemp(join(tmpdir(), "tideline-report-test-"));
}, 60_000);
afterAll(async () => {
  await server?.close();
  await t?.drop();
  if (dir && !process.env.TIDELINE_KEEP_TEST_PDFS) await rm(dir, { recursive: true, force: true });
  else if (dir) console.log(`PDFs kept in ${dir}`);
});

/** Binary GET with the client's session (the helper's call() reads bodies as text). */
async function getBytes(c: Client, path: string) {
  const res = await fetch(server.base + path, { headers: c.cookie ? { cookie: c.cookie } : {} });
  return { status: res.status, headers: res.headers, bytes: Buffer.from(await res.arrayBuffer()) };
}
async function savePdf(bytes: Buffer, name: string) {
  const file = join(dir, name);
  await writeFile(file, bytes);
  return file;
}
const pdfText = async (file: string) =>
  (await run("pdftotext", ["-layout", file, "-"], { maxBuffer: 64 << 20 })).stdout;
const pdfPages = async (file: string) => Number(/Pages:\s+(\d+)/.exec((await run("pdfinfo", [file])).stdout)![1]);
/** A page of the PDF as RGBA pixels, rendered by poppler's pdftoppm. */
async function pagePixels(file: string, page: number, dpi: number) {
  const prefix = join(dir, `p${Math.random().toString(36).slice(2)}`);
  await run("pdftoppm", ["-r", String(dpi), "-f", String(page), "-l", String(page), "-png", file, prefix]);
  const png = (await readdir(dir)).find((f) => join(dir, f).startsWith(prefix))!;
  return join(dir, png);
}
async function decodeQr(png: string, crop?: { left: number; top: number; width: number; height: number }) {
  let img = sharp(png);
  if (crop) img = img.extract(crop);
  const { data, info } = await img.ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return jsQR(new Uint8ClampedArray(data.buffer, data.byteOffset, data.length), info.width, info.height)?.data ?? null;
}

describe("condition survey report", () => {
  let text: string;
  let file: string;
  let pages: number;
  let size: number;

  beforeAll(async () => {
    const r = await getBytes(viewer, `/api/sites/${siteId}/reports/survey.pdf?boardId=${mainId}`);
    expect(r.status).toBe(200);
    expect(r.headers.get("content-type")).toMatch(/application\/pdf/);
    expect(r.headers.get("content-disposition")).toMatch(
      /attachment; filename="condition-survey-mv-kestrel-lantern-main-switchboard/,
    );
    pages = Number(r.headers.get("x-report-pages"));
    size = r.bytes.length;
    file = await savePdf(r.bytes, "main.pdf");
    text = await pdfText(file);
  }, 120_000);

  it("a viewer downloads the main board's report with every section, the caution and the statement that it certifies nothing", () => {
    for (const s of [
      "Condition survey",
      "MV Kestrel Lantern",
      "Main switchboard",
      "Contents",
      "Summary",
      "Board front",
      "Insulation dry-out",
      "Defect register",
      "Parts wanted",
      "Flood event",
      "Return-to-service record",
      "Safety caution and scope of this report",
    ])
      expect(text).toContain(s);
    expect(text).toContain("Flooded switchgear can kill: electric shock and arc flash.");
    expect(text).toContain("NFPA 70E");
    expect(text.replace(/\s+/g, " ")).toContain("It certifies nothing: it does not declare any equipment safe");
    expect(text).toContain("ASTM D610 grade");
    expect(text).toMatch(/Page 2 of \d+/);
  });

  it("numbers in the report agree with the database: positions surveyed of all, each designation, each open defect", async () => {
    const [n] = (
      await sql<{ positions: number; surveyed: number }>`select count(*)::int as positions,
      count(*) filter (where exists (select 1 from inspections i where i.position_id = p.id))::int as surveyed
      from positions p where p.board_id = ${mainId}`.execute(t.db)
    ).rows;
    expect(text).toMatch(new RegExp(`${n.surveyed} / ${n.positions}\\b`));
    const designations = await t.db
      .selectFrom("positions")
      .select("designation")
      .where("boardId", "=", mainId)
      .execute();
    for (const d of designations) expect(text).toContain(d.designation);
    const refs = await t.db.selectFrom("defects").select("ref").where("boardId", "=", mainId).execute();
    for (const r of refs) expect(text).toContain(`D-${r.ref}`);
    const flood = await t.db
      .selectFrom("floodEvents")
      .select("occurredOn")
      .where("siteId", "=", siteId)
      .executeTakeFirstOrThrow();
    expect(text).toContain(flood.occurredOn);
  });

  it("page count matches the header and pdfinfo, the size is within bounds and the app's own fonts are embedded", async () => {
    expect(await pdfPages(file)).toBe(pages);
    expect(pages).toBeGreaterThan(20);
    expect(pages).toBeLessThan(200);
    expect(size).toBeGreaterThan(50_000);
    expect(size).toBeLessThan(8_000_000);
    const fonts = (await run("pdffonts", [file])).stdout;
    expect(fonts).toMatch(/AtkinsonHyperlegibleNext-Regular\s+CID TrueType\s+Identity-H\s+yes yes/);
    expect(fonts).toMatch(/JetBrainsMono/);
  });

  it("the contents page lists each section with the page it is on", async () => {
    const contents = text.split("\f")[1];
    const m = /Defect register\s+(\d+)/.exec(contents);
    expect(m).not.toBeNull();
    const page = Number(m![1]);
    expect(text.split("\f")[page - 1]).toContain("Defect register");
  });

  it("options: only the summary, without photos, in a date range; a whole-site report covers both boards", async () => {
    const small = await getBytes(
      viewer,
      `/api/sites/${siteId}/reports/survey.pdf?boardId=${mainId}&sections=summary&photos=no&paper=letter`,
    );
    expect(small.status).toBe(200);
    const f = await savePdf(small.bytes, "small.pdf");
    const s = await pdfText(f);
    expect(s).toContain("Summary");
    expect(s).not.toContain("Defect register");
    expect(s).toContain("Flooded switchgear can kill");
    expect(await pdfPages(f)).toBeLessThan(pages);
    expect((await run("pdfinfo", [f])).stdout).toMatch(/Page size:\s+612 x 792 pts/);

    const future = await getBytes(
      viewer,
      `/api/sites/${siteId}/reports/survey.pdf?boardId=${mainId}&sections=summary&from=2099-01-01`,
    );
    const fs = await pdfText(await savePdf(future.bytes, "future.pdf"));
    expect(fs).toContain("No inspections recorded");

    const site = await getBytes(viewer, `/api/sites/${siteId}/reports/survey.pdf?sections=summary,board&photos=no`);
    const st = await pdfText(await savePdf(site.bytes, "site.pdf"));
    expect(st).toContain("Emergency board");
    expect(st).toContain("Main switchboard");
    expect(st).toContain("Per board");
  }, 120_000);

  it("days are the site's: a date range counts inspections on the site's calendar, and the report names its zone", async () => {
    // The reference for a zone's day: ICU's tz data (tests/helpers/icu.ts).
    const all = await t.db
      .selectFrom("inspections as i")
      .innerJoin("positions as p", "p.id", "i.positionId")
      .innerJoin("boards as b", "b.id", "p.boardId")
      .select("i.inspectedAt")
      .where("b.siteId", "=", siteId)
      .execute();
    const first = new Date(all[0].inspectedAt);
    // UTC+14 puts an instant from 10:00 UTC on the next day; UTC−11 one before 11:00 UTC on the day before.
    const zone = first.getUTCHours() >= 10 ? "Pacific/Kiritimati" : "Pacific/Pago_Pago";
    const day = icuDay(first, zone);
    expect(day).not.toBe(icuDay(first, "UTC"));
    const expected = all.filter((r) => icuDay(new Date(r.inspectedAt), zone) === day).length;

    const before = (
      await t.db.selectFrom("sites").select("timeZone").where("id", "=", siteId).executeTakeFirstOrThrow()
    ).timeZone;
    const curator = server.client();
    await curator.signIn("curator@tideline.test", DEMO_PASSWORD);
    expect((await curator.put(`/api/sites/${siteId}/time-zone`, { timeZone: zone })).status).toBe(200);
    try {
      const q = surveyReportQuery.parse({ from: day, to: day, sections: "summary", photos: "no" });
      const data = await loadSurveyData(t.db, siteId, q, { id: "x", name: "Test" });
      expect(data.surveyors.reduce((n, s) => n + s.inspections, 0)).toBe(expected);
      expect(icuDay(data.inspectedFrom!, zone)).toBe(day);

      const pdf = await getBytes(viewer, `/api/sites/${siteId}/reports/survey.pdf?sections=summary&photos=no`);
      const text = (await pdfText(await savePdf(pdf.bytes, "zone.pdf"))).replace(/\s+/g, " ");
      expect(text).toContain(`On the site's clock, ${zone}`);
      expect(text).toContain(`Report of ${icuDay(new Date(), zone)}`);
    } finally {
      await curator.put(`/api/sites/${siteId}/time-zone`, { timeZone: before });
    }
  }, 60_000);

  it("bad options get a 400 with the field; strangers get 404; signed-out people 401", async () => {
    const bad = await viewer.get(`/api/sites/${siteId}/reports/survey.pdf?sections=everything`);
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).some((k) => k.startsWith("sections"))).toBe(true);
    const order = await viewer.get(`/api/sites/${siteId}/reports/survey.pdf?from=2026-12-01&to=2026-11-01`);
    expect(order.status).toBe(400);
    expect(order.body.error.fields).toHaveProperty("from");
    const other = await makeSite(t.db, "Other crew's hulk");
    const otherBoard = await t.db
      .insertInto("boards")
      .values({ siteId: other.id, name: "Theirs" })
      .returning("id")
      .executeTakeFirstOrThrow();
    expect((await viewer.get(`/api/sites/${siteId}/reports/survey.pdf?boardId=${otherBoard.id}`)).status).toBe(404);
    expect((await viewer.get(`/api/sites/${other.id}/reports/survey.pdf`)).status).toBe(404);
    expect((await server.client().get(`/api/sites/${siteId}/reports/survey.pdf`)).status).toBe(401);
  });
});

describe("tag labels", () => {
  it("each QR code on the thermal labels decodes (jsqr) to the short URL of its tag, in order", async () => {
    const tags = (
      await t.db
        .selectFrom("components as c")
        .innerJoin("positions as p", "p.id", "c.positionId")
        .select(["c.tagNumber"])
        .where("p.boardId", "=", mainId)
        .where("c.tagNumber", "is not", null)
        .where("c.retiredAt", "is", null)
        .orderBy("p.sortOrder")
        .orderBy("p.designation")
        .limit(3)
        .execute()
    ).map((r) => r.tagNumber!);
    const positionIds = (
      await t.db.selectFrom("components").select("positionId").where("tagNumber", "in", tags).execute()
    ).map((r) => r.positionId);
    const r = await getBytes(
      volunteer,
      `/api/sites/${siteId}/labels.pdf?sheet=thermal-50x25&positionIds=${positionIds.join(",")}`,
    );
    expect(r.status).toBe(200);
    expect(r.headers.get("x-labels")).toBe("3");
    const f = await savePdf(r.bytes, "thermal.pdf");
    expect(await pdfPages(f)).toBe(3);
    expect((await run("pdfinfo", [f])).stdout).toMatch(/Page size:\s+141\.7\d* x 70\.8\d* pts/); // 50 × 25 mm
    const decoded: string[] = [];
    for (let p = 1; p <= 3; p++) decoded.push((await decodeQr(await pagePixels(f, p, 400)))!);
    expect(new Set(decoded)).toEqual(new Set(tags.map((tag) => `${server.base}/t/${tag}`)));
    const words = await pdfText(f);
    for (const tag of tags) expect(words).toContain(tag);
  }, 60_000);

  it("an A4 21-up sheet started at label 5 puts the first label in the fifth slot, and 21 labels spill onto a second sheet", async () => {
    const r = await getBytes(volunteer, `/api/sites/${siteId}/labels.pdf?sheet=a4-21&start=5&boardId=${mainId}`);
    expect(r.status).toBe(200);
    const n = Number(r.headers.get("x-labels"));
    expect(n).toBeGreaterThan(17);
    const f = await savePdf(r.bytes, "a4.pdf");
    expect(await pdfPages(f)).toBe(Math.ceil((n + 4) / 21));
    const sheet = labelSheet("a4-21");
    const dpi = 200;
    const px = (v: number) => Math.round((v / 25.4) * dpi);
    const png = await pagePixels(f, 1, dpi);
    const slot5 = labelSlots(sheet, 1, 5)[0];
    const slot1 = labelSlots(sheet, 1, 1)[0];
    const crop = (s: typeof slot5) => ({
      left: px(s.x),
      top: px(s.y),
      width: px(sheet.labelWidth),
      height: px(sheet.labelHeight),
    });
    expect(await decodeQr(png, crop(slot1))).toBeNull(); // label 1 of a part-used sheet is left alone
    expect(await decodeQr(png, crop(slot5))).toMatch(new RegExp(`^${server.base}/t/KL-\\d{4}$`));
  }, 60_000);

  it("every section of the demo prints on the thermal roll (long names cut with an ellipsis, mono text without ligatures)", async () => {
    const sections = await t.db.selectFrom("sections").select("id").where("siteId", "=", siteId).execute();
    for (const s of sections) {
      const r = await getBytes(volunteer, `/api/sites/${siteId}/labels.pdf?sheet=thermal-50x25&sectionId=${s.id}`);
      expect(r.status).toBe(200);
      expect(r.bytes.subarray(0, 5).toString()).toBe("%PDF-");
    }
  }, 60_000);

  it("viewers cannot print labels; a bad start is a 400", async () => {
    expect((await viewer.get(`/api/sites/${siteId}/labels.pdf?boardId=${mainId}`)).status).toBe(403);
    const bad = await volunteer.get(`/api/sites/${siteId}/labels.pdf?boardId=${mainId}&sheet=a4-21&start=0`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty("start");
    expect((await volunteer.get(`/api/sites/${siteId}/labels.pdf?sheet=a4-21`)).status).toBe(400);
  });
});

describe("tags", () => {
  it("untagged positions get the next KL- numbers once; a second request gives nothing new", async () => {
    const untagged = await t.db
      .selectFrom("components as c")
      .select(["c.positionId"])
      .where("c.siteId", "=", siteId)
      .where("c.tagNumber", "is", null)
      .where("c.retiredAt", "is", null)
      .limit(3)
      .execute();
    const [max] = (
      await sql<{
        n: number;
      }>`select max(substring(tag_number from 4)::int)::int as n from components where tag_number like 'KL-%'`.execute(
        t.db,
      )
    ).rows;
    const ids = untagged.map((u) => u.positionId);
    const r = await volunteer.post(`/api/sites/${siteId}/tags/assign`, { positionIds: ids });
    expect(r.status).toBe(200);
    expect(r.body.assigned.map((a: { tagNumber: string }) => a.tagNumber).sort()).toEqual(
      [1, 2, 3].map((k) => `KL-${String(max.n + k).padStart(4, "0")}`),
    );
    const again = await volunteer.post(`/api/sites/${siteId}/tags/assign`, { positionIds: ids });
    expect(again.body.assigned).toEqual([]);
    expect(again.body.alreadyTagged).toHaveLength(3);
    const audit = await t.db
      .selectFrom("auditLog")
      .select("after")
      .where("positionId", "in", ids)
      .where("entityType", "=", "component")
      .execute();
    expect(audit.length).toBeGreaterThanOrEqual(3);
    expect((await viewer.post(`/api/sites/${siteId}/tags/assign`, { positionIds: ids })).status).toBe(403);
  });

  it("a tag resolves to its position for a member; for anyone else it is not found, worded the same as a tag that does not exist", async () => {
    const tagged = await t.db
      .selectFrom("components as c")
      .innerJoin("positions as p", "p.id", "c.positionId")
      .select(["c.tagNumber", "p.id", "p.designation"])
      .where("c.siteId", "=", siteId)
      .where("c.tagNumber", "is not", null)
      .executeTakeFirstOrThrow();
    const r = await viewer.get(`/api/tags/${encodeURIComponent(tagged.tagNumber!.toLowerCase())}`);
    expect(r.status).toBe(200);
    expect(r.body.matches).toEqual([
      expect.objectContaining({ siteId, positionId: tagged.id, designation: tagged.designation }),
    ]);

    const other = await makeSite(t.db, "Another crew");
    const stranger = await makeUser(t.db, { siteId: other.id, role: "curator", email: "stranger@example.test" });
    const s = server.client();
    await s.signIn(stranger.email, TEST_PASSWORD);
    const hidden = await s.get(`/api/tags/${tagged.tagNumber}`);
    const missing = await s.get(`/api/tags/NO-SUCH-TAG`);
    expect(hidden.status).toBe(404);
    expect(missing.status).toBe(404);
    expect(hidden.body.error.code).toBe("tag_not_found");
    expect(hidden.body.error.message.replace(tagged.tagNumber!, "X")).toBe(
      missing.body.error.message.replace("NO-SUCH-TAG", "X"),
    );
    expect(JSON.stringify(hidden.body)).not.toContain("Kestrel");
    expect((await server.client().get(`/api/tags/${tagged.tagNumber}`)).status).toBe(401);
  });
});

it("the report's photos are downscaled: a 4000 px picture becomes at most 320 px (about 195 dpi as printed)", async () => {
  const { downscale, REPORT_PHOTO_PX } = await import("../../server/reports/service");
  const big = await sharp({ create: { width: 4000, height: 3000, channels: 3, background: "#556677" } })
    .jpeg()
    .toBuffer();
  const meta = await sharp(await downscale(big)).metadata();
  expect(REPORT_PHOTO_PX).toBe(320);
  expect(Math.max(meta.width!, meta.height!)).toBe(REPORT_PHOTO_PX);
});
