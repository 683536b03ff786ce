import type { Insertable } from "kysely";
import type { Database } from "../db/types";
import type { Db } from "./db";

/** The only writer of `audit_log`: rows arrive from server/audit.ts, already JSON-safe. */
export async function insertAuditRows(db: Db, rows: readonly Insertable<Database["auditLog"]>[]) {
  await db
    .insertInto("auditLog")
    .values([...rows])
    .execute();
}
