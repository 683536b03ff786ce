import type { Insertable, Updateable } from "kysely";
import type { Database } from "../../db/types";
import type { Db } from "../db";

/** The only writer of `mail_outbox` (server/mail/outbox.ts says when). */

/** Withdraws the messages for one record still waiting to go. */
export const withdrawWaiting = (db: Db, refType: string, refId: string, lastError: string) =>
  db
    .updateTable("mailOutbox")
    .set({ status: "failed", lastError })
    .where("refType", "=", refType)
    .where("refId", "=", refId)
    .where("status", "in", ["queued", "retrying"])
    .execute();

export const insertMessage = (db: Db, v: Insertable<Database["mailOutbox"]>) =>
  db.insertInto("mailOutbox").values(v).returning("id").executeTakeFirstOrThrow();

export const findMessage = (db: Db, id: string) =>
  db.selectFrom("mailOutbox").selectAll().where("id", "=", id).executeTakeFirst();

export const updateMessage = (db: Db, id: string, patch: Updateable<Database["mailOutbox"]>) =>
  db.updateTable("mailOutbox").set(patch).where("id", "=", id).execute();

/** The newest message for each referenced record. */
export const latestByRef = (db: Db, refType: string, ids: string[]) =>
  db
    .selectFrom("mailOutbox")
    .distinctOn("refId")
    .select(["refId", "status", "lastError", "sentAt", "attempts"])
    .where("refType", "=", refType)
    .where("refId", "in", ids)
    .orderBy("refId")
    .orderBy("createdAt", "desc")
    .execute();
