/**
 * Statements compiled once per shape. Kysely builds a query as a tree of frozen nodes, runs the CamelCase plugin
 * over it and compiles it to SQL on every execution: for the register's page (≈ 4 kB of SQL) that was about a
 * millisecond of the server's CPU per request, the largest piece of its own in a CPU profile (DEVELOPERS.md "Server
 * CPU per request, profiled"). Here a statement is built and compiled once for each *shape* — everything that
 * chooses its SQL text — with a placeholder (`Slot`) standing for each *value*; later calls of the same shape take
 * the SQL as compiled and only put their values in the parameter list. PostgreSQL receives the same text and the
 * same parameters as if the statement had been built anew (checked on every call under tests: `shouldVerify`).
 *
 * The contract of `build(db, shape, values)`: a member of `values` may reach the statement only as a parameter
 * (Kysely's values: `where(col, op, v)`, `sql\`…${v}…\``, `limit(v)`), never choose SQL. Whether a value is absent
 * (null or undefined) and how long an array is are part of the shape on their own, so a builder may branch on those.
 * A value that reached the SQL text (`sql.raw`, `sql.lit`) is refused when the shape is compiled.
 */
import { CompiledQuery, type Compilable } from "kysely";
import type { Db } from "./db";

type Leaf = string | number | boolean | Date | null | undefined;
export type StatementValues = Record<string, Leaf | readonly Leaf[]>;

const MARK = "\u0000slot\u0000";

/** Where a value goes in the parameter list of a compiled shape: `values[name]`, or `values[name][index]`. */
class Slot {
  constructor(
    readonly name: string,
    readonly index: number,
  ) {}
  toString() {
    return MARK; // a value turned into SQL text: found and refused below
  }
  toJSON() {
    return MARK;
  }
}

interface Compiled {
  sql: string;
  /** A Slot for each parameter that is a value; a parameter of the shape's own (a constant) as it is. */
  parameters: readonly unknown[];
}

/**
 * Under tests, every cached statement is checked against one built anew. Read at the first call, not at import:
 * a script may set NODE_ENV after its imports are evaluated.
 */
let verify: boolean | undefined;
const shouldVerify = () => (verify ??= process.env.NODE_ENV === "test" || !!process.env.VITEST);

/** Shapes kept per database handle; past this the oldest is dropped (a query string can make many shapes). */
const MAX_SHAPES = 256;

export interface StatementCache<S, V extends StatementValues, R> {
  /** The statement for `shape` with `values` in its parameters, ready for `db.executeQuery`. */
  compile(db: Db, shape: S, values: V): CompiledQuery<R>;
}

/** The cache key: the shape as JSON, then each value's absence or array length. */
function keyOf(shape: unknown, values: StatementValues): string {
  let k = JSON.stringify(shape ?? null);
  for (const name in values) {
    const v = values[name];
    k += `|${name}:${v == null ? "-" : Array.isArray(v) ? v.length : "1"}`;
  }
  return k;
}

function slotted(values: StatementValues): StatementValues {
  const out: Record<string, unknown> = {};
  for (const name in values) {
    const v = values[name];
    out[name] = v == null ? v : Array.isArray(v) ? v.map((_, i) => new Slot(name, i)) : new Slot(name, -1);
  }
  return out as StatementValues;
}

/** A parameter with its values in: a Slot's value, an array parameter (`= ANY(${ids})`) element by element. */
function fillOne(p: unknown, values: StatementValues): unknown {
  if (p instanceof Slot) return p.index < 0 ? values[p.name] : (values[p.name] as readonly Leaf[])[p.index];
  if (Array.isArray(p)) return p.map((x) => fillOne(x, values));
  return p;
}

function fill(parameters: readonly unknown[], values: StatementValues): unknown[] {
  const out = new Array<unknown>(parameters.length);
  for (let i = 0; i < parameters.length; i++) out[i] = fillOne(parameters[i], values);
  return out;
}

export function statementCache<S, V extends StatementValues, R>(
  build: (db: Db, shape: S, values: V) => Compilable<R>,
): StatementCache<S, V, R> {
  const byDb = new WeakMap<Db, Map<string, Compiled>>();
  return {
    compile(db, shape, values) {
      let shapes = byDb.get(db);
      if (!shapes) byDb.set(db, (shapes = new Map()));
      const key = keyOf(shape, values);
      let c = shapes.get(key);
      if (!c) {
        const q = build(db, shape, slotted(values) as V).compile();
        if (q.sql.includes(MARK)) throw new Error("statementCache: a value was written into the SQL text");
        c = { sql: q.sql, parameters: q.parameters };
        if (shapes.size >= MAX_SHAPES) shapes.delete(shapes.keys().next().value!);
        shapes.set(key, c);
      }
      const parameters = fill(c.parameters, values);
      if (shouldVerify()) {
        const fresh = build(db, shape, values).compile();
        if (fresh.sql !== c.sql || !sameParameters(fresh.parameters, parameters))
          throw new Error(`statementCache: the cached statement differs from one built anew:\n${fresh.sql}\n${c.sql}`);
      }
      return CompiledQuery.raw(c.sql, parameters) as CompiledQuery<R>;
    },
  };
}

function sameParameters(a: readonly unknown[], b: readonly unknown[]): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (!sameValue(a[i], b[i])) return false;
  return true;
}

function sameValue(x: unknown, y: unknown): boolean {
  if (x instanceof Date && y instanceof Date) return x.getTime() === y.getTime();
  if (Array.isArray(x) && Array.isArray(y)) return sameParameters(x, y);
  return Object.is(x, y);
}
