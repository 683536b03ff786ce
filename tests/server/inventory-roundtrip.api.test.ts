/**
 * The spreadsheet round trip: an exported inventory opened and saved in a
 * spreadsheet, then imported again, changes exactly the rows the person edited and adds
 * nothing twice. Spreadsheet habits are reproduced byte for byte (CRLF, no BOM or a BOM,
 * semicolons, Windows-1252, UTF-16 "Unicode text", quoted cells, ="007" saved back as 007),
 * and one test runs the file through real LibreOffice Calc (headless, Debian's
 * libreoffice-calc-nogui) CSV → xlsx → CSV.
 * Encodings checked against iconv-lite's own encoder (a general-purpose reference library);
 * local times against the IANA tz database (Europe/Lisbon is UTC+1 in July, UTC+0 in December).
 */
import { execFile } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import iconv from "iconv-lite";
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { importResponse } from "../../src/schemas/inventory";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { Client, startTestServer, type TestServer } from "../helpers/http";

let t: TestDb;
let server: TestServer;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let curator: Client;
let base: string;

const HEADER = "board,section,designation,kind,grid_row,grid_col,circuit,maker,rating_amps,poles,year,tag_number,notes";
const SEED = [
  HEADER,
  "Steering flat board,Feeders,01,molded_case_breaker,1,1,Steering gear,Harlow & Breen Electric,30,3,1946,007,",
  "Steering flat board,Feeders,02,molded_case_breaker,1,2,Steering alarm,Harlow & Breen Electric,15,2,1946,1E5,",
  'Steering flat board,Feeders,03,molded_case_breaker,1,3,Gyro supply,Harlow & Breen Electric,15,2,1946,KL-3003,"=cleaned, see log"',
  "Steering flat board,Meters,M-1,meter,2,1,Bus voltmeter,Calloway Instrument Works,,,1945,,",
  "Steering flat board,Meters,M-2,meter,2,2,Bus ammeter,Calloway Instrument Works,,,1945,3/4,",
].join("\r\n");

beforeAll(async () => {
  t = await createTestDb();
  server = await startTestServer({ db: t.db });
  fx = await makeCrew(t.db);
  curator = server.client();
  await curator.signIn(fx.crew.curator.email);
  base = `/api/sites/${fx.siteId}`;
  const seeded = await send("commit", SEED + "\r\n");
  expect(seeded.status).toBe(201);
});
afterAll(async () => {
  await server?.close();
  await t?.drop();
});

const send = (mode: string, body: string | Uint8Array, expectDigest?: string) =>
  curator.call("POST", `${base}/inventory/import?mode=${mode}${expectDigest ? `&expect=${expectDigest}` : ""}`, body, {
    "content-type": "text/csv",
  });
const positions = async () =>
  Number(
    (
      await t.db
        .selectFrom("positions")
        .select((eb) => eb.fn.countAll<number>().as("n"))
        .where("siteId", "=", fx.siteId)
        .executeTakeFirstOrThrow()
    ).n,
  );
/** The export's bytes (fetch's text() would drop the BOM). */
async function exportBytes() {
  const res = await fetch(server.base + `${base}/inventory.csv`, { headers: { cookie: curator.cookie } });
  expect(res.status).toBe(200);
  return Buffer.from(await res.arrayBuffer());
}
const exportText = async () => (await exportBytes()).toString("utf8").replace(/^\uFEFF/, "");
const component = (designation: string) =>
  t.db
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .selectAll("c")
    .where("p.siteId", "=", fx.siteId)
    .where("p.designation", "=", designation)
    .executeTakeFirstOrThrow();

/**
 * What a spreadsheet writes back (common practice: LibreOffice Calc and Excel "CSV" in a
 * locale with a decimal comma): cells re-quoted only where needed, the ="…" text guard shown
 * and saved as its value, semicolons, CRLF, no BOM.
 */
function asSpreadsheetSaves(rows: string[][], delimiter: string) {
  const shown = rows.map((r) =>
    r.map((c) => c.replace(/^="((?:[^"]|"")*)"$/, (_m, v: string) => v.replace(/""/g, '"'))),
  );
  return Papa.unparse(shown, { delimiter, newline: "\r\n", quotes: false }) + "\r\n";
}

describe("spreadsheet round trip", () => {
  it("an export imported back as it is changes nothing and duplicates nothing", async () => {
    const before = await positions();
    const file = await exportBytes();
    const p = importResponse.parse((await send("preview", file)).body);
    expect(p.summary).toMatchObject({ rows: before, created: 0, changed: 0, unchanged: before, failed: 0 });
    expect(p.summary.encoding).toEqual({ name: "utf-8", how: "byte_order_mark", confidence: null });
    expect(p.summary.separator).toBe(",");
    expect(p.rows.every((r) => r.matchedBy === "id")).toBe(true);
    const c = await send("commit", file, p.summary.planDigest);
    expect(c.status).toBe(201);
    expect(await positions()).toBe(before);
  });

  it("keeps identifiers a spreadsheet would turn into numbers or dates as text (007, 1E5, 3/4, 01)", async () => {
    const text = await exportText();
    expect(text).toContain('"=""007"""'); // ="007" written as an RFC 4180 quoted cell
    expect(text).toContain('"=""1E5"""');
    expect(text).toContain('"=""3/4"""');
    expect(text).toContain('"=""01"""');
    expect(text).toContain(`"'=cleaned, see log"`); // a formula-like note keeps the CSV-injection guard
  });

  it("Windows-1252 with semicolons and no BOM: the edited rows change (old → new), a new row is created, custody is listed as not applied", async () => {
    const before = await positions();
    const rows = Papa.parse<string[]>(await exportText(), { skipEmptyLines: true }).data;
    const h = rows[0];
    const col = (name: string) => h.findIndex((x) => x === name || x.startsWith(`${name} (`));
    const row = (d: string) => rows.find((r) => r[col("designation")].replace(/[="]/g, "") === d)!;
    row("02")[col("maker")] = "Établissements Vérin & Söhne";
    row("M-1")[col("notes")] = "Needle sticks at ½ scale; glass crazed";
    row("M-1")[col("custody")] = "in_workshop";
    const fresh = h.map(() => "");
    Object.assign(fresh, {
      [col("board")]: "Steering flat board",
      [col("designation")]: "M-3",
      [col("kind")]: "meter",
      [col("grid_row")]: "2",
      [col("grid_col")]: "3",
      [col("maker")]: "Calloway Instrument Works",
      [col("tag_number")]: "0042",
    });
    rows.push(fresh);
    const bytes = iconv.encode(asSpreadsheetSaves(rows, ";"), "windows-1252");
    expect(bytes[0]).not.toBe(0xef);

    const p = importResponse.parse((await send("preview", bytes)).body);
    expect(p.summary.encoding.name).toBe("windows-1252");
    expect(p.summary.encoding.how).toBe("detected");
    expect(p.summary.separator).toBe(";");
    expect(p.summary).toMatchObject({ created: 1, changed: 2, unchanged: before - 2, failed: 0 });
    const byDesignation = Object.fromEntries(p.rows.map((r) => [r.cells.designation, r]));
    expect(byDesignation["02"].changes).toEqual([
      { column: "maker", from: "Harlow & Breen Electric", to: "Établissements Vérin & Söhne" },
    ]);
    expect(byDesignation["M-1"].changes).toEqual([
      { column: "notes", from: "", to: "Needle sticks at ½ scale; glass crazed" },
    ]);
    expect(byDesignation["M-1"].ignored).toEqual([
      expect.objectContaining({ column: "custody", from: "in_place", to: "in_workshop" }),
    ]);
    expect(byDesignation["M-3"].action).toBe("create");
    expect(byDesignation["01"].action).toBe("unchanged"); // 01 and 007 came back without their ="" and still match
    expect(await positions()).toBe(before); // the preview wrote nothing

    const c = await send("commit", bytes, p.summary.planDigest);
    expect(c.status).toBe(201);
    expect(await positions()).toBe(before + 1);
    expect((await component("02")).maker).toBe("Établissements Vérin & Söhne");
    expect((await component("M-1")).notes).toBe("Needle sticks at ½ scale; glass crazed");
    expect((await component("M-1")).custody).toBe("in_place");
    expect((await component("M-3")).tagNumber).toBe("0042");
    expect((await component("01")).tagNumber).toBe("007");

    // The same file again: everything is already so.
    const again = importResponse.parse((await send("preview", bytes)).body);
    expect(again.summary).toMatchObject({ changed: 0, created: 0, failed: 0 }); // M-3 (no id in the file) matches by designation
  });

  it("UTF-16 with a BOM and tabs (a spreadsheet's 'Unicode text') imports as unchanged", async () => {
    const rows = Papa.parse<string[]>(await exportText(), { skipEmptyLines: true }).data;
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), iconv.encode(asSpreadsheetSaves(rows, "\t"), "utf-16le")]);
    const p = importResponse.parse((await send("preview", utf16)).body);
    expect(p.summary.encoding).toMatchObject({ name: "utf-16le", how: "byte_order_mark" });
    expect(p.summary.separator).toBe("\t");
    expect(p.summary).toMatchObject({ changed: 0, created: 0, failed: 0 });
  });

  it("a short semicolon file with a trailing empty line is read with semicolons (the header decides)", async () => {
    const file =
      "board;designation;kind;grid_row;grid_col\r\nTiller board;T-1;fuse;1;1\r\nTiller board;T-2;fuse;1;2\r\n\r\n";
    const r = await send("preview", file);
    expect(r.status).toBe(200);
    expect(r.body.summary).toMatchObject({ separator: ";", created: 2, failed: 0 });
  });

  it("a row edited in Tideline after the export is refused, not overwritten; a commit after a change since the preview gets 409", async () => {
    const text = await exportText();
    const c = await component("03");
    // Someone edits 03 in Tideline after the file was exported.
    const edit = await curator.patch(`${base}/components/${c.id}`, { model: "Type Q", version: c.version });
    expect(edit.status).toBe(200);
    const rows = Papa.parse<string[]>(text, { skipEmptyLines: true }).data;
    const h = rows[0];
    const maker = h.indexOf("maker");
    rows.find((r) => r.includes("KL-3003"))![maker] = "Harlow and Breen";
    const file = Papa.unparse(rows, { newline: "\r\n" });
    const p = importResponse.parse((await send("preview", file)).body);
    const row03 = p.rows.find((r) => r.cells.designation === "03")!;
    expect(row03.action).toBe("problem");
    expect(row03.errors.row_version).toMatch(/Changed in Tideline since this file was exported/);
    expect((await send("commit", file)).status).toBe(400);
    expect((await component("03")).model).toBe("Type Q");

    // A fresh export, previewed; then someone changes a row before the commit.
    const fresh = Papa.parse<string[]>(await exportText(), { skipEmptyLines: true }).data;
    fresh.find((r) => r.includes("KL-3003"))![maker] = "Harlow and Breen";
    const file2 = Papa.unparse(fresh, { newline: "\r\n" });
    const p2 = importResponse.parse((await send("preview", file2)).body);
    expect(p2.summary).toMatchObject({ changed: 1, failed: 0 });
    const m1 = await component("M-2");
    await curator.patch(`${base}/components/${m1.id}`, { serial: "S-77", version: m1.version });
    const late = await send("commit", file2, p2.summary.planDigest);
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe("import_changed");
    expect((await component("03")).maker).toBe("Harlow & Breen Electric");
  });

  it("two rows may swap grid cells; a row may not move a position to another board", async () => {
    const rows = Papa.parse<string[]>(await exportText(), { skipEmptyLines: true }).data;
    const h = rows[0];
    const [gc, board] = [h.indexOf("grid_col"), h.indexOf("board")];
    const r1 = rows.find((r) => r.includes("Bus voltmeter"))!;
    const r2 = rows.find((r) => r.includes("Bus ammeter"))!;
    [r1[gc], r2[gc]] = [r2[gc], r1[gc]];
    const p = importResponse.parse((await send("preview", Papa.unparse(rows, { newline: "\r\n" }))).body);
    expect(p.summary).toMatchObject({ changed: 2, failed: 0 });
    expect((await send("commit", Papa.unparse(rows, { newline: "\r\n" }), p.summary.planDigest)).status).toBe(201);
    const moved = await t.db
      .selectFrom("positions")
      .select(["designation", "gridCol"])
      .where("siteId", "=", fx.siteId)
      .where("designation", "in", ["M-1", "M-2"])
      .orderBy("designation")
      .execute();
    expect(moved).toEqual([
      { designation: "M-1", gridCol: 2 },
      { designation: "M-2", gridCol: 1 },
    ]);
    const again = Papa.parse<string[]>(await exportText(), { skipEmptyLines: true }).data;
    again.find((r) => r.includes("Bus voltmeter"))![board] = "Another board";
    const bad = importResponse.parse((await send("preview", Papa.unparse(again, { newline: "\r\n" }))).body);
    expect(bad.rows.find((r) => r.cells.designation === "M-1")!.errors.board).toMatch(
      /does not move positions between boards/,
    );
  });

  it("writes times in the site's time zone, named in the header", async () => {
    const zone = await curator.put(`${base}/time-zone`, { timeZone: "Europe/Lisbon" });
    expect(zone.status).toBe(200);
    expect((await curator.put(`${base}/time-zone`, { timeZone: "Mars/Olympus" })).status).toBe(400);
    const c = await component("01");
    for (const at of ["2026-07-01T12:00:00Z", "2026-11-30T09:15:00Z"])
      await t.db
        .insertInto("inspections")
        .values({
          siteId: fx.siteId,
          componentId: c.id,
          positionId: c.positionId,
          inspectedAt: new Date(at),
          percentRusted: 1,
        })
        .execute();
    const text = await exportText();
    const [header, ...rows] = Papa.parse<string[]>(text, { skipEmptyLines: true }).data;
    const i = header.indexOf("latest_inspected_at (Europe/Lisbon)");
    expect(i).toBeGreaterThan(0);
    // IANA tz: Lisbon is UTC+0 on 30 November (WET); the newest inspection is the one exported.
    expect(rows.find((r) => r.includes("Steering gear"))![i]).toBe("2026-11-30 09:15:00");
    expect(text).not.toMatch(/\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/);
    // …and the file still imports as unchanged, the zone's note in the header notwithstanding.
    expect(importResponse.parse((await send("preview", text)).body).summary.changed).toBe(0);
  });

  it("survives a real spreadsheet: LibreOffice Calc opens the export, saves it as xlsx, then as CSV; nothing changes", async () => {
    if (!existsSync("/usr/bin/soffice"))
      throw new Error("LibreOffice Calc is missing: npm test installs libreoffice-calc-nogui");
    const dir = mkdtempSync(join(tmpdir(), "tideline-calc-"));
    try {
      writeFileSync(join(dir, "inventory.csv"), await exportBytes());
      const run = promisify(execFile);
      const soffice = (args: string[]) =>
        run("/usr/bin/soffice", [`-env:UserInstallation=file://${dir}/profile`, "--headless", ...args], {
          cwd: dir,
          timeout: 240_000,
        });
      // 44 = comma, 34 = double quote, 76 = UTF-8, 1 = first line (the Calc CSV filter's options).
      await soffice([
        "--infilter=CSV:44,34,76,1",
        "--convert-to",
        "xlsx",
        "--outdir",
        join(dir, "xlsx"),
        "inventory.csv",
      ]);
      await soffice([
        "--convert-to",
        "csv:Text - txt - csv (StarCalc):44,34,76,1",
        "--outdir",
        join(dir, "back"),
        join(dir, "xlsx", "inventory.xlsx"),
      ]);
      const back = readFileSync(join(dir, "back", "inventory.csv"));
      expect(back.toString("utf8")).toContain('"007"'); // text, not 7
      const p = importResponse.parse((await send("preview", back)).body);
      const changed = p.rows.filter((r) => r.action !== "unchanged");
      expect(changed).toEqual([]);
      expect(p.summary.unchanged).toBe(await positions());
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 600_000);
});
