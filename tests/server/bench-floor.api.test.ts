import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDb, type TestDb } from "../helpers/db";
import type { FloorPath } from "../../server/bench/floor-server";
import { planReplay } from "../../server/bench/replay";
import { startFloor, type Floor } from "../../server/bench/floor";

// The bench's bare-HTTP side (server/bench/floor-server.ts): for a captured path it replays that path's statements on
// the real PostgreSQL and sends the endpoint's answer as it was, compressed as the server compresses a whole answer.
let t: TestDb;
let floor: Floor | undefined;
let base: string;
const answer = { rows: Array.from({ length: 100 }, (_, i) => ({ id: i, designation: `CB-${i}`, note: "verdigris" })) };

beforeAll(async () => {
  t = await createTestDb();
  // The statement leaves a mark the test can read: the plan really runs, on the database it is given.
  await t.db.schema.createTable("floor_marks").addColumn("n", "integer").execute();
  const plans: Record<string, FloorPath> = {
    "/api/x?a=1": {
      plan: planReplay([{ sql: "insert into floor_marks (n) values ($1)", params: [7], start: 0, end: 1 }]),
      body: JSON.stringify(answer),
    },
  };
  floor = await startFloor(t.url, plans, 2);
  base = floor.base;
}, 60_000);
afterAll(async () => {
  await floor?.stop();
  await t.drop();
});

describe("the bench's bare-HTTP side", () => {
  it("replays the path's statements, then sends the endpoint's answer, brotli when asked, raw when not", async () => {
    const br = await fetch(`${base}/api/x?a=1`, { headers: { "accept-encoding": "br" } });
    expect(br.status).toBe(200);
    // fetch decodes on its own; the header says what was sent.
    expect(br.headers.get("content-encoding")).toBe("br");
    expect(await br.json()).toEqual(answer);
    const plain = await fetch(`${base}/api/x?a=1`, { headers: { "accept-encoding": "identity" } });
    expect(plain.headers.get("content-encoding")).toBeNull();
    expect(await plain.json()).toEqual(answer);
    const marks = await t.db
      .selectFrom("floor_marks" as never)
      .select("n" as never)
      .execute();
    expect(marks).toEqual([{ n: 7 }, { n: 7 }]);
  });

  it("a path it was not given is 404", async () => {
    expect((await fetch(`${base}/api/x?a=2`)).status).toBe(404);
  });
});
