import { sql, type SqlBool } from "kysely";
import { afterAll, describe, expect, it } from "vitest";
import { createDb } from "../../server/db";
import { registerArgs, registerPageStatement } from "../../server/defects/list-repository";
import { statementCache } from "../../server/statement-cache";
import { FLAGS, listQuery, SORT_KEYS } from "../../src/schemas/defects";

// Nothing here connects: statements are only built and compiled (Kysely's PostgreSQL compiler, the app's plugins).
const db = createDb("postgres://nobody@127.0.0.1:9/none");
afterAll(() => db.destroy());

const SITE = "0b7f3c1e-4d2a-4c55-9a51-1f2e3d4c5b6a";
const OTHER_SITE = "6f1d2c3b-4a59-4e87-8d76-5c4b3a291807";
const ids = (n: number, salt: string) =>
  Array.from({ length: n }, (_, i) => `${salt}${String(i).padStart(7, "0")}-0000-4000-8000-000000000000`.slice(-36));

describe("statements compiled once per shape", () => {
  it("a cached statement equals the one built anew for every register view, each value changed between calls", () => {
    const views = [
      {},
      { q: "verdigris" },
      { q: "D-12" },
      { q: "50%_off" },
      { board: ids(2, "b") },
      { category: ["mechanical"], severity: ["disabling", "impaired"], status: ["raised", "scheduled"] },
      { assignee: [ids(1, "a")[0], "none"] },
      { assignee: ["none"] },
      ...FLAGS.map((flag) => ({ flag: [flag] })),
      { flag: ["overdue", "pinned"], q: "busbar", board: ids(1, "c") },
      ...SORT_KEYS.flatMap((sort) => [
        { sort, dir: "asc" },
        { sort, dir: "desc", page: 3, size: 10 },
      ]),
    ];
    for (const view of views) {
      // The same shape twice: the second call's values go into the first call's SQL. Under tests every call is also
      // built anew and compared (statementCache's shouldVerify), so a difference throws here.
      const a = registerArgs(SITE, listQuery.parse(view), "2027-02-01");
      const again = listQuery.parse({ ...view, page: 7, size: 30 });
      const b = registerArgs(OTHER_SITE, again, "2027-03-15");
      const first = registerPageStatement.compile(db, a.shape, a.values);
      const second = registerPageStatement.compile(db, b.shape, b.values);
      expect(second.sql).toBe(first.sql);
      expect(second.parameters).toContain(OTHER_SITE);
      expect(second.parameters).not.toContain(SITE);
    }
  });

  it("a builder that lets a value choose its SQL is caught (tests verify every call against a fresh build)", () => {
    const bad = statementCache((d: typeof db, _s: null, v: { n: number }) =>
      d
        .selectFrom("boards")
        .select("id")
        .limit(typeof v.n === "number" && v.n > 5 ? 1 : 2),
    );
    expect(() => bad.compile(db, null, { n: 9 })).toThrow(/differs from one built anew/);
  });

  it("a value written into the SQL text is refused", () => {
    const raw = statementCache((d: typeof db, _s: null, v: { name: string }) =>
      d
        .selectFrom("boards")
        .select("id")
        .where(sql.raw<SqlBool>(`name = '${v.name}'`)),
    );
    expect(() => raw.compile(db, null, { name: "Main switchboard" })).toThrow(/written into the SQL text/);
  });

  it("absent values and array lengths are shapes of their own", () => {
    const s = statementCache((d: typeof db, _s: null, v: { ids: string[]; name: string | null }) => {
      let q = d.selectFrom("boards").select("id");
      if (v.ids.length) q = q.where("id", "in", v.ids);
      if (v.name !== null) q = q.where("name", "=", v.name);
      return q;
    });
    const one = s.compile(db, null, { ids: ids(1, "d"), name: null });
    const three = s.compile(db, null, { ids: ids(3, "e"), name: "Aft distribution" });
    expect(one.parameters).toEqual(ids(1, "d"));
    expect(three.parameters).toEqual([...ids(3, "e"), "Aft distribution"]);
    expect(three.sql).toMatch(/in \(\$1, \$2, \$3\) and "name" = \$4/);
  });
});
