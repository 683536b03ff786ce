import type { Db } from "../../server/db";

/** A board with two sections, N positions (one component each, alternating heritage) and one inspection. */
export async function makeBoard(db: Db, siteId: string, name = "Main switchboard", n = 6) {
  const board = await db.insertInto("boards").values({ siteId, name }).returning("id").executeTakeFirstOrThrow();
  const sections = [];
  for (const [i, s] of ["Generator panel", "Feeder panel"].entries())
    sections.push(
      await db
        .insertInto("sections")
        .values({ siteId, boardId: board.id, name: `${name} · ${s}`, sortOrder: i })
        .returning("id")
        .executeTakeFirstOrThrow(),
    );
  const positions = [];
  for (let i = 1; i <= n; i++) {
    const p = await db
      .insertInto("positions")
      .values({
        siteId,
        boardId: board.id,
        sectionId: sections[i % 2].id,
        designation: `1-${i}`,
        kind: "molded_case_breaker",
        gridRow: 1,
        gridCol: i,
      })
      .returning(["id", "sectionId"])
      .executeTakeFirstOrThrow();
    const c = await db
      .insertInto("components")
      .values({ siteId, positionId: p.id, kind: "molded_case_breaker", heritage: i % 2 ? "original" : "modern" })
      .returning(["id", "heritage"])
      .executeTakeFirstOrThrow();
    positions.push({ ...p, componentId: c.id, heritage: c.heritage });
  }
  const inspection = await db
    .insertInto("inspections")
    .values({ siteId, componentId: positions[0].componentId, positionId: positions[0].id, percentRusted: 3 })
    .returning("id")
    .executeTakeFirstOrThrow();
  return { boardId: board.id, sections: sections.map((s) => s.id), positions, inspectionId: inspection.id };
}
