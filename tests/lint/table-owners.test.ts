/**
 * One writer per table: every table of db/types.ts has one owning server module, and only that module
 * inserts into, updates or deletes from it (Kysely's `insertInto` / `updateTable` / `deleteFrom` /
 * `mergeInto`, or the same words in raw SQL). Another domain changes the table by calling the owner's
 * service in its own transaction. A domain's repository is imported by that domain only.
 *
 * Not scanned: db/migrations (they make the tables), server/seed, server/cli and server/bench (the demo
 * scenario and the bench's generated sites are written directly, then the summaries are refreshed;
 * DEVELOPERS.md "Conventions"), and tests.
 */
import { readdirSync, readFileSync } from "node:fs";
import { join, relative } from "node:path";
import { describe, expect, it } from "vitest";
import { projectRoot } from "../../db/pg";

/** Table (Kysely's camelCase name) → the only module (a domain folder, or one file) that writes it. */
const OWNERS: Record<string, string> = {
  users: "server/auth/",
  sessions: "server/auth/",
  rateLimits: "server/auth/", // rate-limiter-flexible's store, configured in server/auth/throttle.ts
  sites: "server/sites/",
  memberships: "server/sites/",
  floodEvents: "server/inventory/",
  boards: "server/inventory/",
  sections: "server/inventory/",
  positions: "server/inventory/",
  components: "server/inventory/",
  inspections: "server/inventory/",
  custodyMoves: "server/inventory/",
  dispositionDecisions: "server/inventory/",
  boardSummaries: "server/inventory/",
  defects: "server/defects/",
  defectPins: "server/defects/",
  defectStatusChanges: "server/defects/",
  defectViews: "server/defects/",
  defectReadings: "server/defects/",
  defectTallies: "server/defects/", // written only by its triggers on defects (migration 2026_12_09_0100)
  photos: "server/photos/",
  photoSettings: "server/photos/",
  invitations: "server/invitations/",
  passwordResets: "server/password-reset/",
  notificationPrefs: "server/notifications/",
  partLines: "server/parts/",
  partDemandLinks: "server/parts/",
  partLeads: "server/parts/",
  partAcquisitions: "server/parts/",
  partLineHistory: "server/parts/",
  partShareLinks: "server/parts/",
  partBudgetShares: "server/parts/",
  partBudgetBoards: "server/parts/",
  insulationReadings: "server/readings/",
  contactReadings: "server/readings/",
  thermalScans: "server/readings/",
  groundLampChecks: "server/readings/",
  readingCriteria: "server/readings/",
  componentReadingOverrides: "server/readings/",
  tripTests: "server/readings/",
  stepVoltageTests: "server/readings/",
  groundHuntSteps: "server/readings/",
  mailOutbox: "server/mail/",
  rtsQualifiedPersons: "server/return-to-service/",
  rtsSettings: "server/return-to-service/",
  rtsStages: "server/return-to-service/",
  rtsStageItems: "server/return-to-service/",
  rtsSteps: "server/return-to-service/",
  rtsSignoffs: "server/return-to-service/",
  rtsEnergisations: "server/return-to-service/",
  rtsWatchChecks: "server/return-to-service/",
  rtsIncidents: "server/return-to-service/",
  rtsBreakerOperations: "server/return-to-service/",
  rtsOperationBudgets: "server/return-to-service/",
  rtsOverdueNotices: "server/return-to-service/",
  idempotencyKeys: "server/idempotency/",
  preparedFiles: "server/prepared-files/",
  auditLog: "server/audit",
  exportSlots: "server/export-",
};

/** Folders whose files are not the application's writers (see the header). */
const NOT_SCANNED = ["server/cli/", "server/bench/", "server/seed/"];

const camel = (snake: string) => snake.replace(/_([a-z])/g, (_m, c: string) => c.toUpperCase());

interface Write {
  table: string;
  line: number;
}

/** The table writes in one file's text: Kysely calls with a literal table (or `x as "table"`), and raw SQL. */
function writesIn(text: string): Write[] {
  const out: Write[] = [];
  const lineOf = (i: number) => text.slice(0, i).split("\n").length;
  for (const m of text.matchAll(/\.(insertInto|updateTable|deleteFrom|mergeInto)\(\s*(?:[\w.]+ as )?("|')?([\w ]*)/g))
    out.push({ table: m[2] ? m[3].split(" ")[0] : `<not a literal: ${m[3]}>`, line: lineOf(m.index) });
  // Raw SQL inside sql`…`: INSERT INTO x, UPDATE x SET, DELETE FROM x (snake_case names).
  for (const m of text.matchAll(
    /\b(?:insert\s+into|delete\s+from)\s+([a-z_]+)|\bupdate\s+([a-z_]+)\s+(?:(?:as\s+)?\w+\s+)?set\b/gi,
  ))
    out.push({ table: camel((m[1] ?? m[2]).toLowerCase()), line: lineOf(m.index) });
  return out;
}

function tsFiles(dir: string): string[] {
  return readdirSync(join(projectRoot, dir), { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? tsFiles(join(dir, e.name)) : e.name.endsWith(".ts") ? [join(dir, e.name)] : [],
  );
}

const serverFiles = tsFiles("server").filter((f) => !NOT_SCANNED.some((p) => f.startsWith(p)));
const read = (f: string) => readFileSync(join(projectRoot, f), "utf8");

/** The tables of `interface Database` in db/types.ts. */
function databaseTables(): string[] {
  const body = /export interface Database \{([\s\S]*?)\n\}/.exec(read("db/types.ts"))![1];
  return [...body.matchAll(/^\s*(\w+):/gm)].map((m) => m[1]);
}

describe("one writer per table", () => {
  it("names an owner for every table of the schema, and no table that is not in it", () => {
    expect(Object.keys(OWNERS).sort()).toEqual(databaseTables().sort());
  });

  it("finds writes in made-up code: Kysely calls, a cast table name, raw SQL, a table it cannot name", () => {
    const code = [
      'await trx.insertInto("defects").values(v).execute();',
      'db.updateTable(table as "boards").set(p);',
      "await sql`UPDATE part_lines pl SET status = 'open'`.execute(trx);",
      "await sql`update part_lines set x = 1`.execute(trx);",
      "await sql`DELETE FROM custody_moves WHERE id = ${id}`.execute(trx);",
      "db.deleteFrom(name).execute();",
    ].join("\n");
    expect(writesIn(code).map((w) => w.table)).toEqual([
      "defects",
      "boards",
      "<not a literal: name>",
      "partLines",
      "partLines",
      "custodyMoves",
    ]);
  });

  it("writes each table only from its owner", () => {
    const strays: string[] = [];
    let seen = 0;
    for (const f of serverFiles) {
      for (const w of writesIn(read(f))) {
        seen++;
        const owner = OWNERS[w.table];
        if (!owner) strays.push(`${f}:${w.line} writes ${w.table}, which has no owner`);
        else if (!f.startsWith(owner)) strays.push(`${f}:${w.line} writes ${w.table}, owned by ${owner}`);
      }
    }
    expect(seen).toBeGreaterThan(100); // the scan itself still sees the application's writes
    expect(strays).toEqual([]);
  });

  it("imports a domain's repository only from that domain", () => {
    // A domain is a folder of server/, or a top-level file's name up to its first "-" or "."
    // (server/audit.ts and server/audit-repository.ts are the audit domain; OWNERS says the same).
    const domainOf = (file: string) => {
      const [first, ...rest] = relative("server", file).split("/");
      return rest.length ? first : first.split(/[-.]/)[0];
    };
    const strays: string[] = [];
    for (const f of serverFiles) {
      const domain = domainOf(f);
      for (const m of read(f).matchAll(/from "(\.{1,2}\/[^"]*repository)"/g)) {
        const target = relative(projectRoot, join(projectRoot, f, "..", m[1]));
        const owner = domainOf(target);
        if (owner !== domain) strays.push(`${f} imports ${target}`);
      }
    }
    expect(strays).toEqual([]);
  });
});
