/**
 * The defect register's URL state is read with the server's own query schema (listQuery in
 * src/schemas/defects.ts): what the server would refuse never reaches it from a link.
 */
import { describe, expect, it } from "vitest";
import { listQuery } from "../../src/schemas/defects";
import { DEFAULT_HIDDEN, apiQuery, readState, writeState } from "../../src/features/defects/url-state";

const BOARD = "0b7a4c2e-1f00-4a8e-9d53-6a1f7d2c9e10";
const read = (q: string) => readState(new URLSearchParams(q));

describe("register URL state", () => {
  it("an empty URL is the default view", () => {
    expect(read("")).toEqual({
      q: "",
      board: [],
      category: [],
      severity: [],
      status: [],
      assignee: [],
      flag: [],
      sort: "priority",
      dir: "desc",
      page: 0,
      size: 25,
      hide: DEFAULT_HIDDEN,
      cols: [],
    });
  });

  it("reads repeated and comma-separated values, and writes them back to the same view", () => {
    const s = read(
      `board=${BOARD}&status=raised,scheduled&flag=safety&sort=severity&dir=asc&page=2&size=50&q=bus%20tie`,
    );
    expect(s).toMatchObject({
      board: [BOARD],
      status: ["raised", "scheduled"],
      flag: ["safety"],
      sort: "severity",
      dir: "asc",
      page: 2,
      size: 50,
      q: "bus tie",
    });
    expect(read(writeState(s))).toEqual(s);
  });

  it("drops a value the server would refuse, keeping the rest of the view", () => {
    const s = read("status=raised&status=open&board=not-a-uuid&sort=colour&dir=up&page=-1&size=7&flag=pinned");
    expect(s.status).toEqual(["raised"]); // "open" is no longer a state (renamed to "raised")
    expect(s.board).toEqual([]);
    expect(s).toMatchObject({ sort: "priority", dir: "desc", page: 0, size: 25, flag: ["pinned"] });
  });

  it("keeps the search text as typed (a trailing space while typing), within the server's limit", () => {
    expect(read("q=main%20").q).toBe("main ");
    expect(read(`q=${"x".repeat(201)}`).q).toBe("");
  });

  it("the API query it sends parses with the server's schema to the same filters", () => {
    const s = read(`board=${BOARD}&category=corrosion&status=raised&assignee=none&sort=dueOn&page=1`);
    const sent = Object.fromEntries(
      [...new URLSearchParams(apiQuery(s, "2026-11-20")).entries()].reduce((m, [k, v]) => {
        m.set(k, m.has(k) ? `${m.get(k)},${v}` : v);
        return m;
      }, new Map<string, string>()),
    );
    const parsed = listQuery.parse(sent);
    expect(parsed).toMatchObject({
      board: s.board,
      category: s.category,
      status: s.status,
      assignee: ["none"],
      sort: "dueOn",
      page: 1,
      today: "2026-11-20",
    });
  });
});
