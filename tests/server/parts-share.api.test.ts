import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Papa from "papaparse";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CSV_COLUMNS, csvHeader, csvRow } from "../../server/parts/csv";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { BREAKER, makeBoard, makeComponent } from "./parts-fixtures";

// CSV: RFC 4180 (papaparse) in UTF-8 with a BOM; formula guard per OWASP "CSV Injection".
let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let scrounger: Client;
let curator: Client;
let lineId: string;
let photoId: string;
const storage = new LocalDiskStorage(mkdtempSync(join(tmpdir(), "tideline-parts-")));
const THUMB = Buffer.from([0xff, 0xd8, 0xff, 0xe0, 1, 2, 3, 0xff, 0xd9]); // bytes only compared, never decoded
const PRIVATE = {
  notes: '=HYPERLINK("http://x") ask Bosun privately',
  contact: "Yardmaster, 07700 900123",
  price: 4321.5,
  member: "Test scrounger",
};

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db, photoStorage: storage });
  fx = await makeCrew(t.db);
  scrounger = server.client();
  curator = server.client();
  await scrounger.signIn(fx.crew.scrounger.email);
  await curator.signIn(fx.crew.curator.email);
  const board = await makeBoard(t.db, fx.siteId, "Aft board");
  const a1 = await makeComponent(t.db, fx.siteId, board.id, "A-1", { ...BREAKER, disposition: "replace" });
  const photo = await t.db
    .insertInto("photos")
    .values({
      siteId: fx.siteId,
      boardId: board.id,
      positionId: a1.positionId,
      componentId: a1.componentId,
      kind: "nameplate",
      format: "jpeg",
      width: 10,
      height: 10,
      bytes: THUMB.length,
      originalKey: "o",
      displayKey: "d",
      thumbKey: `sites/${fx.siteId}/np/thumb.jpg`,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  photoId = photo.id;
  await storage.put(`sites/${fx.siteId}/np/thumb.jpg`, THUMB, "image/jpeg");
  await makeComponent(t.db, fx.siteId, board.id, "A-2", {
    ...BREAKER,
    frame: '+K, "quoted"\nframe',
    disposition: "source",
  });
  const lines = (await scrounger.get(`/api/sites/${fx.siteId}/parts`)).body.lines;
  const line = lines.find((l: any) => l.frame === "K-225");
  lineId = line.id;
  await scrounger.patch(`/api/sites/${fx.siteId}/parts/${lineId}`, {
    version: line.version,
    notes: PRIVATE.notes,
    estimatedUnitCost: 1234,
  });
  await scrounger.post(`/api/sites/${fx.siteId}/parts/${lineId}/leads`, {
    source: "Dealer in old switchgear",
    contact: PRIVATE.contact,
    askingPrice: PRIVATE.price,
  });
  await scrounger.post(`/api/sites/${fx.siteId}/parts`, {
    kind: "ground_lamp",
    voltageRating: 250,
    need: "clear lamp lens",
    qty: 3,
  });
});
afterAll(async () => {
  await server.close();
  await t.drop();
});

describe("CSV export", () => {
  it("parsed back with papaparse equals the table the API returns, row for row (BOM, CRLF, quoting)", async () => {
    const r = await scrounger.get(`/api/sites/${fx.siteId}/parts.csv`);
    expect(r.status).toBe(200);
    expect(r.headers.get("content-type")).toMatch(/text\/csv; charset=utf-8/);
    expect(r.headers.get("content-disposition")).toMatch(/attachment; filename="wanted-parts-\d{4}-\d{2}-\d{2}\.csv"/);
    // fetch's text() drops a BOM, so read the bytes: EF BB BF is U+FEFF in UTF-8.
    const raw = new Uint8Array(
      await (
        await fetch(server.base + `/api/sites/${fx.siteId}/parts.csv`, { headers: { cookie: scrounger.cookie } })
      ).arrayBuffer(),
    );
    expect([...raw.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const text = new TextDecoder("utf-8", { ignoreBOM: true }).decode(raw);
    expect(text.charCodeAt(0)).toBe(0xfeff);
    expect(text).toContain("\r\n");
    const parsed = Papa.parse<string[]>(text.slice(1), { skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    const { lines } = (await scrounger.get(`/api/sites/${fx.siteId}/parts`)).body;
    expect(parsed.data[0]).toEqual(csvHeader("UTC")); // a new site's zone is UTC
    expect(parsed.data.slice(1)).toEqual(lines.map((l: any) => csvRow(l, "UTC")));
    expect(parsed.data).toHaveLength(lines.length + 1);
    const frameCol = CSV_COLUMNS.indexOf("Frame");
    expect(parsed.data.map((row) => row[frameCol])).toContain('\'+K, "quoted"\nframe'); // quoted, newline kept, formula-guarded
  });

  it("guards cells that a spreadsheet would run as a formula", async () => {
    const text = (await scrounger.get(`/api/sites/${fx.siteId}/parts.csv`)).body as string; // BOM already dropped by fetch
    const rows = Papa.parse<string[]>(text, { skipEmptyLines: true }).data;
    const notes = rows.map((row) => row[CSV_COLUMNS.indexOf("Notes")]);
    expect(notes).toContain(`'${PRIVATE.notes}`);
    expect(notes.some((n) => n.startsWith("="))).toBe(false);
  });

  it("exports only the current filter", async () => {
    const text = (await scrounger.get(`/api/sites/${fx.siteId}/parts.csv?kind=ground_lamp`)).body as string;
    const rows = Papa.parse<string[]>(text, { skipEmptyLines: true }).data;
    expect(rows).toHaveLength(2);
    expect(rows[1][CSV_COLUMNS.indexOf("Part wanted")]).toBe("clear lamp lens");
  });
});

describe("CSV times in the site's time zone", () => {
  // Check values from the IANA tz database (America/Halifax: UTC−4 standard time, UTC−3 daylight time
  // from the second Sunday of March to the first Sunday of November; Asia/Kolkata: UTC+5:30, no DST).
  it("writes a line's last change as the site's wall-clock time, the zone named in the header", async () => {
    expect((await curator.put(`/api/sites/${fx.siteId}/time-zone`, { timeZone: "America/Halifax" })).status).toBe(200);
    await t.db
      .updateTable("partLines")
      .set({ updatedAt: new Date("2027-01-15T12:00:00Z") })
      .where("id", "=", lineId)
      .execute();
    let rows = Papa.parse<string[]>((await scrounger.get(`/api/sites/${fx.siteId}/parts.csv`)).body, {
      skipEmptyLines: true,
    }).data;
    const col = CSV_COLUMNS.indexOf("Updated");
    expect(rows[0][col]).toBe("Updated (America/Halifax)");
    const frame = CSV_COLUMNS.indexOf("Frame");
    expect(rows.find((r) => r[frame] === "K-225")![col]).toBe("2027-01-15 08:00:00"); // AST, UTC−4
    await t.db
      .updateTable("partLines")
      .set({ updatedAt: new Date("2026-07-01T23:30:00Z") })
      .where("id", "=", lineId)
      .execute();
    rows = Papa.parse<string[]>((await scrounger.get(`/api/sites/${fx.siteId}/parts.csv`)).body, {
      skipEmptyLines: true,
    }).data;
    expect(rows.find((r) => r[frame] === "K-225")![col]).toBe("2026-07-01 20:30:00"); // ADT, UTC−3
    expect((await curator.put(`/api/sites/${fx.siteId}/time-zone`, { timeZone: "Asia/Kolkata" })).status).toBe(200);
    rows = Papa.parse<string[]>((await scrounger.get(`/api/sites/${fx.siteId}/parts.csv`)).body, {
      skipEmptyLines: true,
    }).data;
    expect(rows[0][col]).toBe("Updated (Asia/Kolkata)");
    expect(rows.find((r) => r[frame] === "K-225")![col]).toBe("2026-07-02 05:00:00"); // UTC+5:30, next day
    // no "T…Z" form anywhere: a spreadsheet keeps that as text
    expect(rows.flat().some((c) => /\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/.test(c))).toBe(false);
    await curator.put(`/api/sites/${fx.siteId}/time-zone`, { timeZone: "UTC" });
  });
});

describe("public share link", () => {
  it("shows specifications, quantities and photos to anyone with the link, and no price, contact, note or member name", async () => {
    const made = await scrounger.post(`/api/sites/${fx.siteId}/parts/share-links`, { label: "For the harbour trust" });
    expect(made.status).toBe(201);
    expect(made.body.token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    const stored = await t.db
      .selectFrom("partShareLinks")
      .select("tokenHash")
      .where("id", "=", made.body.link.id)
      .executeTakeFirstOrThrow();
    expect(stored.tokenHash).not.toContain(made.body.token); // only the hash is kept
    const anon = server.client();
    const r = await anon.get(`/api/share/parts/${made.body.token}`);
    expect(r.status).toBe(200);
    expect(r.body.siteName).toBe("Test hulk");
    expect(r.body.lines.length).toBe(3);
    const allowed = [
      "ref",
      "kind",
      "ratingAmps",
      "poles",
      "voltageRating",
      "frame",
      "mounting",
      "maker",
      "model",
      "need",
      "title",
      "qty",
      "heritageRule",
      "status",
      "photoUrls",
    ];
    for (const l of r.body.lines) expect(Object.keys(l).sort()).toEqual([...allowed].sort());
    const json = JSON.stringify(r.body);
    for (const secret of [
      "1234",
      String(PRIVATE.price),
      PRIVATE.contact,
      "Bosun",
      PRIVATE.member,
      "Dealer in old switchgear",
      "estimated",
      "spent",
      "notes",
      "contact",
      "asking",
    ])
      expect(json, `share JSON leaks ${secret}`).not.toContain(secret);
    // Free text typed on a line or a defect never leaves the site; the line is still there by its spec.
    expect(json).not.toContain("clear lamp lens");
    // …but the partner reads that the line is for a part of the unit, not a whole one, in fixed words.
    expect(r.body.lines.find((l: any) => l.kind === "ground_lamp")).toMatchObject({
      qty: 3,
      need: "a part of this unit, not the whole unit: ask the crew which",
    });
    const withPhoto = r.body.lines.find((l: any) => l.photoUrls.length);
    expect(withPhoto.photoUrls).toEqual([`/api/share/parts/${made.body.token}/photos/${photoId}`]);
    const img = await fetch(server.base + withPhoto.photoUrls[0]);
    expect(img.status).toBe(200);
    expect(Buffer.from(await img.arrayBuffer())).toEqual(THUMB);
    expect(
      (await fetch(server.base + `/api/share/parts/${made.body.token}/photos/00000000-0000-4000-8000-000000000000`))
        .status,
    ).toBe(404);
  });

  it("a defect's free-text parts needed (a phone number, a price) is not in the shared list; its line is, by spec", async () => {
    const board = await makeBoard(t.db, fx.siteId, "Share-check board");
    const c = await makeComponent(t.db, fx.siteId, board.id, "S-9", { ...BREAKER, ratingAmps: 400, frame: "L-400" });
    const d = await curator.post(`/api/sites/${fx.siteId}/defects`, {
      boardId: board.id,
      positionId: c.positionId,
      componentId: c.componentId,
      title: "Arc chute cracked",
      category: "mechanical",
      severity: "impaired",
      partsNeeded: "arc chute - ring Jory on 07700 900456, quoted $85",
      partsState: "wanted",
    });
    expect(d.status).toBe(201);
    const made = await curator.post(`/api/sites/${fx.siteId}/parts/share-links`, { label: "Free-text check" });
    const r = await server.client().get(`/api/share/parts/${made.body.token}`);
    expect(r.status).toBe(200);
    const json = JSON.stringify(r.body);
    for (const secret of ["07700 900456", "$85", "Jory", "arc chute"])
      expect(json, `share JSON leaks ${secret}`).not.toContain(secret);
    expect(r.body.lines.some((l: any) => l.ratingAmps === 400 && l.frame === "L-400")).toBe(true);
  });

  it("members get the nameplate thumbnail through the parts route; outsiders get 404", async () => {
    const r = await fetch(server.base + `/api/sites/${fx.siteId}/parts/photos/${photoId}/thumb`, {
      headers: { cookie: scrounger.cookie },
    });
    expect(r.status).toBe(200);
    expect(Buffer.from(await r.arrayBuffer())).toEqual(THUMB);
    expect((await fetch(server.base + `/api/sites/${fx.siteId}/parts/photos/${photoId}/thumb`)).status).toBe(401);
  });

  it("stops working once the curator revokes it (410), an unknown token is 404, and only the curator may revoke", async () => {
    const made = await scrounger.post(`/api/sites/${fx.siteId}/parts/share-links`, {});
    const anon = server.client();
    expect((await anon.get(`/api/share/parts/${made.body.token}`)).status).toBe(200);
    expect((await scrounger.del(`/api/sites/${fx.siteId}/parts/share-links/${made.body.link.id}`)).status).toBe(403);
    const rv = await curator.del(`/api/sites/${fx.siteId}/parts/share-links/${made.body.link.id}`);
    expect(rv.status).toBe(200);
    expect(rv.body.links.find((l: any) => l.id === made.body.link.id).revokedAt).not.toBeNull();
    const gone = await anon.get(`/api/share/parts/${made.body.token}`);
    expect(gone.status).toBe(410);
    expect(gone.body.error.code).toBe("revoked");
    expect((await fetch(server.base + `/api/share/parts/${made.body.token}/photos/${photoId}`)).status).toBe(410);
    expect((await anon.get(`/api/share/parts/${"x".repeat(43)}`)).status).toBe(404);
    expect((await anon.get(`/api/share/parts/short`)).status).toBe(404);
  });

  it("a viewer may not create share links (403); share-link listing never contains a token", async () => {
    const viewer = server.client();
    await viewer.signIn(fx.crew.viewer.email);
    expect((await viewer.post(`/api/sites/${fx.siteId}/parts/share-links`, {})).status).toBe(403);
    const list = await scrounger.get(`/api/sites/${fx.siteId}/parts/share-links`);
    expect(list.status).toBe(200);
    for (const l of list.body.links)
      expect(Object.keys(l).sort()).toEqual(["createdAt", "createdByName", "id", "label", "revokedAt"]);
  });
});
