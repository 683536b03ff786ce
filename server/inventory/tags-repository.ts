/** Tag numbers' queries (server/inventory/tags-service.ts says when each runs). */
import { sql } from "kysely";
import type { Db } from "../db";

/** One site's tag assignments run one at a time, until the transaction ends. */
export const lockSiteTags = (trx: Db, siteId: string) =>
  sql`select pg_advisory_xact_lock(hashtext(${`tideline:tags:${siteId}`}))`.execute(trx);

/**
 * The current components at these positions, in board and label order (the order tags are given out in),
 * locked first in id order: the one order every writer that takes several components uses
 * (survey-repository's `lockComponents`), so a tag run crossing a part's fitting waits instead of
 * deadlocking. With ORDER BY, FOR NO KEY UPDATE takes the rows in the sorted order, hence two statements.
 */
export const componentsToTag = async (trx: Db, siteId: string, positionIds: string[]) => {
  await trx
    .selectFrom("components")
    .select("id")
    .where("siteId", "=", siteId)
    .where("positionId", "in", positionIds)
    .where("retiredAt", "is", null)
    .orderBy("id")
    .forNoKeyUpdate()
    .execute();
  return trx
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .select(["c.id", "c.positionId", "c.tagNumber", "p.boardId", "p.designation", "p.sortOrder"])
    .where("c.siteId", "=", siteId)
    .where("c.positionId", "in", positionIds)
    .where("c.retiredAt", "is", null)
    .orderBy("p.boardId")
    .orderBy("p.sortOrder")
    .orderBy("p.designation")
    .execute();
};

/** Every tag number in use on the site (retired components' too). */
export const siteTagNumbers = async (trx: Db, siteId: string) =>
  (
    await trx
      .selectFrom("components")
      .select("tagNumber")
      .where("siteId", "=", siteId)
      .where("tagNumber", "is not", null)
      .execute()
  ).map((r) => r.tagNumber!);

export const setTagNumber = (trx: Db, componentId: string, tagNumber: string) =>
  trx
    .updateTable("components")
    .set({ tagNumber, version: sql`version + 1`, updatedAt: new Date() })
    .where("id", "=", componentId)
    .execute();

/** The current positions carrying this tag (any case) on the person's sites, or every site for an admin. */
export const positionsWithTag = (db: Db, user: { id: string; isAdmin: boolean }, tag: string) =>
  db
    .selectFrom("components as c")
    .innerJoin("positions as p", "p.id", "c.positionId")
    .innerJoin("boards as b", "b.id", "p.boardId")
    .innerJoin("sites as s", "s.id", "c.siteId")
    .select([
      "s.id as siteId",
      "s.name as siteName",
      "b.id as boardId",
      "b.name as boardName",
      "p.id as positionId",
      "p.designation",
    ])
    .where(sql<string>`lower(c.tag_number)`, "=", tag.toLowerCase())
    .where("c.retiredAt", "is", null)
    .$if(!user.isAdmin, (w) =>
      w.where("c.siteId", "in", (eb) => eb.selectFrom("memberships").select("siteId").where("userId", "=", user.id)),
    )
    .orderBy("s.name")
    .execute();
