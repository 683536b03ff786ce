/**
 * The import boundaries of eslint.config.js, checked against made-up files so a change to the
 * config that stops enforcing one fails here (the layering is DEVELOPERS.md "Where code lives").
 * Each case lints a snippet as if it were a file at `at`; the imports name real modules.
 */
import { ESLint } from "eslint";
import { beforeAll, describe, expect, it } from "vitest";
import { projectRoot } from "../../db/pg";

const eslint = new ESLint({ cwd: projectRoot });

async function ruleIds(at: string, code: string) {
  const [result] = await eslint.lintText(code, { filePath: `${projectRoot}/${at}` });
  return result.messages.map((m) => m.ruleId);
}

const BOUNDARY = "import-x/no-restricted-paths";

// Loading the config and its plugins takes seconds on a busy machine: once, under the hook timeout.
beforeAll(() => ruleIds("src/domain/warm-up.ts", "export {};\n"));

describe("import boundaries", () => {
  it.each([
    [
      "a feature imports another feature",
      "src/features/parts/probe.ts",
      'import { defectKeys } from "../defects/api";',
    ],
    ["src/domain imports client I/O", "src/domain/probe.ts", 'import { api } from "../lib/api-client";'],
    ["src/domain imports a feature", "src/domain/probe.ts", 'import { defectKeys } from "../features/defects/api";'],
    ["src/schemas imports the server", "src/schemas/probe.ts", 'import { createDb } from "../../server/db";'],
    ["the server imports a feature", "server/probe.ts", 'import { defectKeys } from "../src/features/defects/api";'],
    ["the server imports client I/O", "server/defects/probe.ts", 'import { api } from "../../src/lib/api-client";'],
    ["db imports a client component", "db/probe.ts", 'import { Button } from "../src/components/button";'],
    ["a page imports the server", "src/app/routes/probe.tsx", 'import { createDb } from "../../../server/db";'],
    ["client lib imports the database", "src/lib/probe.ts", 'import { migrateToLatest } from "../../db/migrate";'],
    ["a route imports its repository", "server/defects/routes.ts", 'import { findRow } from "./repository";'],
    [
      "a route imports another domain's repository",
      "server/sites/routes.ts",
      'import { findUserById } from "../auth/repository";',
    ],
    [
      "a route file imports a named repository",
      "server/inventory/boards-routes.ts",
      'import { listBoards } from "./boards-repository";',
    ],
  ])("refuses: %s", async (_name, at, code) => {
    expect(await ruleIds(at, `${code}\nexport {};\n`)).toContain(BOUNDARY);
  });

  it("refuses Node's own modules in pure code", async () => {
    expect(await ruleIds("src/domain/probe.ts", 'import { readFileSync } from "node:fs";\nexport {};\n')).toContain(
      "no-restricted-imports",
    );
  });

  it.each([
    ["a feature imports its own api", "src/features/parts/probe.ts", 'import { partsKeys } from "./api";'],
    [
      "a page composes two features",
      "src/app/routes/probe.tsx",
      'import { defectKeys } from "../../features/defects/api";\nimport { partsKeys } from "../../features/parts/api";',
    ],
    ["src/domain imports src/schemas", "src/domain/probe.ts", 'import { text } from "../schemas/common";'],
    ["the server imports src/domain", "server/probe.ts", 'import { can } from "../src/domain/permissions";'],
    [
      "a route imports its service and reads",
      "server/photos/routes.ts",
      'import { toPhoto } from "./service";\nimport { photoOf } from "./reads";',
    ],
    ["a service imports its repository", "server/photos/service.ts", 'import { findPhoto } from "./repository";'],
    [
      "a feature imports shared UI and domain",
      "src/features/parts/probe.ts",
      'import { Button } from "../../components/button";\nimport { can } from "../../domain/permissions";',
    ],
  ])("allows: %s", async (_name, at, code) => {
    expect(await ruleIds(at, `${code}\nexport {};\n`)).not.toContain(BOUNDARY);
  });
});

describe("queries only in repository files", () => {
  const QUERY = "no-restricted-syntax";
  const statement =
    'import type { Db } from "../db";\nexport const f = (db: Db) => db.selectFrom("sites").selectAll().execute();\n';
  const raw =
    'import { sql } from "kysely";\nimport type { Db } from "../db";\nexport const f = (db: Db) => sql`select 1`.execute(db);\n';
  const write = 'import type { Db } from "../db";\nexport const f = (db: Db) => db.deleteFrom("sites").execute();\n';

  it.each([
    ["a service runs a Kysely select", "server/sites/service.ts", statement],
    ["a reads module runs raw SQL", "server/sites/reads.ts", raw],
    ["a route deletes", "server/sites/routes.ts", write],
    ["a new module beside a repository", "server/sites/helpers.ts", statement],
  ])("refuses: %s", async (_name, at, code) => {
    expect(await ruleIds(at, code)).toContain(QUERY);
  });

  it.each([
    ["a repository", "server/sites/repository.ts", statement],
    ["a named repository runs raw SQL", "server/inventory/boards-repository.ts", raw],
    ["a bench script", "server/cli/bench.ts", statement],
    [
      "a query fragment handed to a repository",
      "server/sites/service.ts",
      'import { sql } from "kysely";\nexport const now = sql`now()`;\n',
    ],
  ])("allows: %s", async (_name, at, code) => {
    expect(await ruleIds(at, code)).not.toContain(QUERY);
  });
});

describe("imports go one way (no cycles)", () => {
  const CYCLE = "import-x/no-cycle";
  it.each([
    // readings/service.ts imports ./reads and tells return to service of each reading, which reads readings.
    [
      "the readings' reads import their service",
      "server/readings/reads.ts",
      'import { recordInsulation } from "./service";',
    ],
    // parts/workflow.ts → defects/service.ts → parts/service.ts: the service may not hand the workflow out.
    [
      "the parts service re-exports its workflow",
      "server/parts/service.ts",
      'export { moveLineStatus } from "./workflow";',
    ],
    [
      "a photo store imports the module that chooses it",
      "server/photos/storage/s3.ts",
      'import { photoKey } from "./index";',
    ],
  ])("refuses: %s", async (_name, at, code) => {
    expect(await ruleIds(at, `${code}\nexport {};\n`)).toContain(CYCLE);
  });

  it.each([
    [
      "defects' evidence reads readings' reads",
      "server/defects/evidence.ts",
      'import { listInsulation } from "../readings/reads";',
    ],
    [
      "a photo store imports the contract",
      "server/photos/storage/s3.ts",
      'import { StorageNotFound } from "./contract";',
    ],
  ])("allows: %s", async (_name, at, code) => {
    expect(await ruleIds(at, `${code}\nexport {};\n`)).not.toContain(CYCLE);
  });
});
