import { insertAuditRows } from "./audit-repository";
import type { Db } from "./db";

export interface AuditEntry {
  /** null for what belongs to no site (sign-ins, accounts). */
  siteId: string | null;
  entityType: string;
  entityId: string;
  action: string;
  actorId: string | null;
  boardId?: string | null;
  positionId?: string | null;
  before?: unknown;
  after?: unknown;
}

/** Dates and undefined become JSON-safe; only the fields that changed are kept by diff(). */
const json = (v: unknown) => (v === undefined || v === null ? null : JSON.stringify(v));

/** Records who changed what (before/after) in the same transaction as the change. */
/** One entry as its audit_log row. */
const row = (e: AuditEntry) => ({
  siteId: e.siteId,
  entityType: e.entityType,
  entityId: e.entityId,
  action: e.action,
  actorId: e.actorId,
  boardId: e.boardId ?? null,
  positionId: e.positionId ?? null,
  before: json(e.before),
  after: json(e.after),
});

/** Records who changed what (before/after) in the same transaction as the change. */
export async function recordAudit(db: Db, e: AuditEntry) {
  await insertAuditRows(db, [row(e)]);
}

/** Many audit rows in one statement per 1,000 (set-based writers such as the wanted list's demand sync). */
export async function recordAuditMany(db: Db, entries: readonly AuditEntry[]) {
  const rows = entries.map(row);
  for (let i = 0; i < rows.length; i += 1000) await insertAuditRows(db, rows.slice(i, i + 1000));
}

/** The changed fields of an update, as { before, after } holding only those keys. */
export function diff<T extends Record<string, unknown>>(before: T, patch: Partial<T>) {
  const b: Record<string, unknown> = {};
  const a: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(patch)) {
    if (v === undefined) continue;
    const old = before[k];
    const same =
      old instanceof Date && v instanceof Date
        ? old.getTime() === v.getTime()
        : JSON.stringify(old) === JSON.stringify(v);
    if (!same) {
      b[k] = old;
      a[k] = v;
    }
  }
  return { before: b, after: a, changed: Object.keys(a).length > 0 };
}
