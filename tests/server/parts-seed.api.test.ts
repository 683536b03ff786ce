import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seedDemo } from "../../server/seed/demo";
import { createTestDb, type TestDb } from "../helpers/db";
import { startTestServer, type TestServer } from "../helpers/http";

// The demo scenario is invented (server/seed/people.ts); this checks the wanted list it leaves.
let t: TestDb;
let server: TestServer;

beforeAll(async () => {
  t = await createTestDb();
  await seedDemo(t.db);
  server = await startTestServer({ db: t.db });
}, 120_000);
afterAll(async () => {
  await server.close();
  await t.drop();
});

describe("demo wanted list", () => {
  it("has register demand for every component set to replace or source, hand-added spares, leads and an acquisition", async () => {
    const c = server.client();
    await c.signIn("scrounger@tideline.test", "tideline-demo");
    const site = (await c.get("/api/sites")).body.sites[0];
    const body = (await c.get(`/api/sites/${site.id}/parts`)).body;
    const wanted = await t.db
      .selectFrom("components")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .where("disposition", "in", ["replace", "source"])
      .where("retiredAt", "is", null)
      .executeTakeFirstOrThrow();
    const demanded = body.lines
      .filter((l: any) => l.origin === "register")
      .reduce(
        (s: number, l: any) => s + l.positions.filter((p: any) => p.componentId && p.state === "active").length,
        0,
      );
    expect(demanded).toBe(Number(wanted.n));
    expect(body.lines.find((l: any) => l.origin === "manual")).toMatchObject({ qty: 6, heritageRule: "modern_ok" });
    expect(body.lines.filter((l: any) => l.leadCount > 0).length).toBeGreaterThanOrEqual(3);
    expect(body.lines.some((l: any) => l.status === "acquired" && l.spent === 170)).toBe(true);
    expect(body.budget.total.spent).toBe(170);
  });
});
