/**
 * The embedded database signs in by password only (scram-sha-256, on
 * 127.0.0.1 and on its socket), and the app runs as its own role, which owns its database
 * but is no superuser: it can create neither roles nor databases and cannot read the
 * password hashes in pg_authid. The test databases are made the way `npm start` makes the
 * app's (tests/helpers/db.ts), so everything here is what the app itself can and cannot do.
 * Source: PostgreSQL 15 documentation, "Client Authentication" (pg_hba.conf, scram-sha-256)
 * and "Database Roles" (role attributes, pg_authid readable by superusers only).
 */
import { statSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import pg from "pg";
import { APP_ROLE, HBA_CONF, passwordsFile } from "../../db/pg";
import { createTestDb, type TestDb } from "../helpers/db";

let t: TestDb;
let app: pg.Client;

beforeAll(async () => {
  t = await createTestDb();
  app = new pg.Client({ connectionString: t.url });
  await app.connect();
});
afterAll(async () => {
  await app?.end();
  await t?.drop();
});

/** The SQLSTATE of what `sql` fails with, or "ok". */
async function outcome(c: pg.Client, sql: string) {
  try {
    await c.query(sql);
    return "ok";
  } catch (e) {
    return (e as { code?: string }).code ?? String(e);
  }
}

/** How a sign-in ends: "ok", or the error's SQLSTATE (28P01 = wrong password) or message. */
async function signIn(config: pg.ClientConfig) {
  const c = new pg.Client(config);
  try {
    await c.connect();
    return "ok";
  } catch (e) {
    return (e as { code?: string }).code ?? (e as Error).message;
  } finally {
    await c.end().catch(() => {});
  }
}

describe("the app's database role", () => {
  it("is the app's own role, not a superuser, and may not create roles or databases", async () => {
    const { rows } = await app.query(
      "SELECT current_user AS who, rolsuper, rolcreaterole, rolcreatedb, rolreplication, rolbypassrls FROM pg_roles WHERE rolname = current_user",
    );
    expect(rows[0]).toEqual({
      who: APP_ROLE,
      rolsuper: false,
      rolcreaterole: false,
      rolcreatedb: false,
      rolreplication: false,
      rolbypassrls: false,
    });
    // 42501 insufficient_privilege
    expect(await outcome(app, "CREATE ROLE intruder LOGIN PASSWORD 'x'")).toBe("42501");
    expect(await outcome(app, `ALTER ROLE ${APP_ROLE} SUPERUSER`)).toBe("42501");
    expect(await outcome(app, "CREATE DATABASE intruder")).toBe("42501");
  });

  it("cannot read pg_authid (the password hashes) nor files of the server", async () => {
    expect(await outcome(app, "SELECT rolpassword FROM pg_authid")).toBe("42501");
    expect(await outcome(app, "SELECT pg_read_file('pg_hba.conf')")).toBe("42501");
    expect(await outcome(app, "COPY (SELECT 1) TO '/tmp/tideline-intruder'")).toBe("42501");
  });

  it("owns its database and every table, sequence and schema in it (migrations need no superuser)", async () => {
    const owner = await app.query("SELECT pg_get_userbyid(datdba) AS owner FROM pg_database WHERE datname = $1", [
      t.name,
    ]);
    expect(owner.rows[0].owner).toBe(APP_ROLE);
    const foreign = await app.query(
      `SELECT n.nspname, c.relname, pg_get_userbyid(c.relowner) AS owner
         FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
        WHERE c.relkind IN ('r', 'S', 'v', 'm', 'p') AND n.nspname IN ('public', 'pgboss') AND c.relowner <> 'tideline_app'::regrole`,
    );
    expect(foreign.rows).toEqual([]);
    const tables = await app.query("SELECT count(*)::int AS n FROM pg_tables WHERE schemaname = 'public'");
    expect(tables.rows[0].n).toBeGreaterThan(20);
  });
});

describe("signing in to the embedded database", () => {
  const target = () => {
    const u = new URL(inject("appUrl"));
    return { host: u.hostname, port: Number(u.port), database: "postgres" };
  };

  it("refuses the app's role and the superuser without their password, or with a wrong one (127.0.0.1)", async () => {
    for (const user of [APP_ROLE, "postgres"]) {
      expect(await signIn({ ...target(), user, password: "not-the-password" })).toBe("28P01");
      // No password at all: the server asks for one (node-postgres then gives up without sending any).
      expect(await signIn({ ...target(), user, password: "" })).not.toBe("ok");
    }
    expect(await signIn({ ...target(), user: APP_ROLE, password: decodeURIComponent(new URL(t.url).password) })).toBe(
      "ok",
    );
  });

  it("refuses a wrong password on the server's own socket too", async () => {
    const admin = new pg.Client({ connectionString: inject("adminUrl") });
    await admin.connect();
    const dir = (await admin.query("SHOW unix_socket_directories")).rows[0].unix_socket_directories as string;
    const rules = (await admin.query("SELECT type, auth_method FROM pg_hba_file_rules ORDER BY line_number")).rows;
    await admin.end();
    expect(rules).toEqual([
      { type: "local", auth_method: "scram-sha-256" },
      { type: "host", auth_method: "scram-sha-256" },
    ]);
    for (const user of [APP_ROLE, "postgres"])
      expect(await signIn({ host: dir, port: target().port, database: "postgres", user, password: "nope" })).toBe(
        "28P01",
      );
  });

  it("keeps the passwords in .data, readable by their owner only, and pg_hba.conf as written", () => {
    expect(statSync(passwordsFile("pg-test")).mode & 0o777).toBe(0o600);
    expect(HBA_CONF).not.toMatch(/\btrust\b|\bpeer\b|\bmd5\b/);
  });
});
