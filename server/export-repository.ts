/** Download slots' queries: the only writer of `export_slots` (server/export-stream.ts says when). */
import { sql } from "kysely";
import type { Db } from "./db";

/** One person's slot changes, one at a time until the transaction ends. */
export const lockHolder = (trx: Db, holder: string) =>
  sql`SELECT pg_advisory_xact_lock(hashtext('tideline.export-slots'), hashtext(${holder}))`.execute(trx);

/** The person's slots whose lease ran out (an instance that died holding them). */
export const deleteLapsedSlots = (trx: Db, holder: string) =>
  trx
    .deleteFrom("exportSlots")
    .where("holder", "=", holder)
    .where("leaseUntil", "<", sql<Date>`now()`)
    .execute();

export const slotCount = async (trx: Db, holder: string) =>
  Number(
    (
      await trx
        .selectFrom("exportSlots")
        .select((eb) => eb.fn.countAll<number>().as("n"))
        .where("holder", "=", holder)
        .executeTakeFirstOrThrow()
    ).n,
  );

export const insertSlot = async (trx: Db, holder: string, leaseMs: number) =>
  (
    await trx
      .insertInto("exportSlots")
      .values({ holder, leaseUntil: sql<Date>`now() + ${leaseMs} * interval '1 millisecond'` })
      .returning("id")
      .executeTakeFirstOrThrow()
  ).id;

export const extendSlot = (db: Db, id: string, leaseMs: number) =>
  db
    .updateTable("exportSlots")
    .set({ leaseUntil: sql<Date>`now() + ${leaseMs} * interval '1 millisecond'` })
    .where("id", "=", id)
    .execute();

export const deleteSlot = (db: Db, id: string) => db.deleteFrom("exportSlots").where("id", "=", id).execute();
