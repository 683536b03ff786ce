/**
 * Site overview counts (see overviewResponse in src/schemas/inventory.ts for each
 * definition). One query fetches a narrow row per position; the tally is plain code.
 */
import { CUSTODY, DISPOSITIONS } from "../../src/domain/vocab";
import { GRADE_KEYS, type Overview } from "../../src/schemas/inventory";
import type { Db } from "../db";

const zeros = <K extends string>(keys: readonly K[]) => Object.fromEntries(keys.map((k) => [k, 0])) as Record<K, number>;

const positionStates = (db: Db, siteId: string) =>
  db
    .selectFrom("positions as p")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .leftJoin("components as c", (j) => j.onRef("c.positionId", "=", "p.id").on("c.retiredAt", "is", null))
    .leftJoinLateral(
      (eb) => eb.selectFrom("inspections as i").select("i.astmGrade").whereRef("i.componentId", "=", "c.id").orderBy("i.inspectedAt", "desc").orderBy("i.createdAt", "desc").limit(1).as("li"),
      (j) => j.onTrue(),
    )
    .select(["b.id as boardId", "b.name as boardName", "c.heritage", "c.custody", "c.disposition", "li.astmGrade"])
    .select((eb) => eb.exists(eb.selectFrom("inspections as i2").select("i2.id").whereRef("i2.positionId", "=", "p.id")).as("surveyed"))
    .where("p.siteId", "=", siteId)
    .execute();

export async function overview(db: Db, siteId: string): Promise<Overview> {
  const [rows, boards] = await Promise.all([
    positionStates(db, siteId),
    db.selectFrom("boards").select(["id", "name"]).where("siteId", "=", siteId).orderBy("name").execute(),
  ]);
  const bySurveyState = zeros(["not_surveyed", "inspected", "decided"] as const);
  const byDisposition = zeros([...DISPOSITIONS, "undecided"] as const);
  const byCustody = zeros(CUSTODY);
  const byGrade = zeros(GRADE_KEYS);
  const perBoard = new Map(boards.map((b) => [b.id, { id: b.id, name: b.name, positions: 0, surveyed: 0 }]));
  let surveyed = 0;
  let retained = 0;
  for (const r of rows) {
    const b = perBoard.get(r.boardId)!;
    b.positions++;
    if (r.surveyed) { surveyed++; b.surveyed++; }
    bySurveyState[r.disposition ? "decided" : r.surveyed ? "inspected" : "not_surveyed"]++;
    byDisposition[r.disposition ?? "undecided"]++;
    if (r.custody) byCustody[r.custody]++;
    byGrade[r.astmGrade === null || r.astmGrade === undefined ? "ungraded" : (String(r.astmGrade) as (typeof GRADE_KEYS)[number])]++;
    if (r.heritage === "original" && r.custody !== "scrapped" && r.custody !== "missing") retained++;
  }
  return {
    totals: { positions: rows.length, surveyed, bySurveyState },
    byDisposition, byCustody, byGrade,
    originalRetainedPercent: rows.length ? Math.round((retained / rows.length) * 1000) / 10 : null,
    boards: [...perBoard.values()],
  };
}
