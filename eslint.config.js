// ESLint (flat config). `npm run lint`; `npm test -- types` runs it after tsc and prettier.
// The import-boundary zones below are the layering DEVELOPERS.md describes ("Where code lives").
import js from "@eslint/js";
import { createNodeResolver, importX } from "eslint-plugin-import-x";
import reactHooks from "eslint-plugin-react-hooks";
import globals from "globals";
import tseslint from "typescript-eslint";

const FEATURES = [
  "auth",
  "defects",
  "inventory",
  "invitations",
  "mailbox",
  "notification-prefs",
  "parts",
  "password-reset",
  "photos",
  "prepared-files",
  "readings",
  "reports",
  "return-to-service",
  "sites",
];

/** Client code that talks to the browser or the API: never imported by pure or server code. */
const CLIENT_IO = ["./src/features", "./src/app", "./src/components", "./src/lib", "./src/main.tsx"];

const boundaries = [
  // Features never import each other: pages in src/app/routes compose them.
  ...FEATURES.map((f) => ({
    target: `./src/features/${f}`,
    from: "./src/features",
    except: [`./${f}`],
    message: "Features never import each other; compose them in a page under src/app/routes.",
  })),
  // Trade rules and shared schemas are pure: no I/O, no client, no server, no database.
  ...["./src/domain", "./src/schemas"].map((target) => ({
    target,
    from: [...CLIENT_IO, "./src/config", "./server", "./db"],
    message: "src/domain and src/schemas are pure: they import only each other and packages.",
  })),
  // The server never reaches into the client.
  {
    target: ["./server", "./db"],
    from: CLIENT_IO,
    message: "Server code imports src/domain and src/schemas only, never client code.",
  },
  // A server route only parses, checks the role, calls a service and answers: queries sit behind
  // the domain's service or reads (DEVELOPERS.md "Where code lives"), never imported by a route.
  {
    target: ["./server/*/routes.ts", "./server/*/*-routes.ts"],
    from: ["./server/**/repository.ts", "./server/**/*-repository.ts"],
    message: "A route calls its domain's service (or reads.ts), never a repository.",
  },
  // The client never reaches into the server or the database.
  {
    target: "./src",
    from: ["./server", "./db"],
    message: "Client code talks to the server through its API (src/lib/api-client), never by import.",
  },
];

/**
 * Only repository files run queries (DEVELOPERS.md "Where code lives"): a Kysely statement (`selectFrom`,
 * `insertInto`, `updateTable`, `deleteFrom`, `mergeInto`) or an executed raw `sql` template. Query fragments
 * (`sql\`now()\`` in a patch) may be built elsewhere and handed to a repository.
 */
const QUERY_STATEMENTS = [
  {
    selector:
      "CallExpression[callee.property.name=/^(selectFrom|insertInto|updateTable|deleteFrom|mergeInto|replaceInto)$/]",
    message: "Queries live in the domain's repository (repository.ts or *-repository.ts); call it from here.",
  },
  {
    selector: "CallExpression[callee.property.name=/^execute/][callee.object.type='TaggedTemplateExpression']",
    message: "Raw SQL lives in the domain's repository (repository.ts or *-repository.ts); call it from here.",
  },
];

export default tseslint.config(
  {
    ignores: ["node_modules/", "dist/", ".data/", "test-results/", "playwright-report/", "fonts/", "src/public/"],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    files: ["**/*.{ts,tsx,js,mjs}"],
    languageOptions: { ecmaVersion: 2023, sourceType: "module" },
    plugins: { "import-x": importX },
    settings: {
      "import-x/resolver-next": [createNodeResolver({ extensions: [".ts", ".tsx", ".js", ".mjs", ".json"] })],
      // no-cycle reads each imported module; TypeScript needs TypeScript's parser to be read at all.
      "import-x/parsers": { "@typescript-eslint/parser": [".ts", ".tsx"] },
    },
    rules: {
      "import-x/no-restricted-paths": ["error", { zones: boundaries }],
      // Layers go one way: no module reaches itself again through its imports (DEVELOPERS.md,
      // "Imports go one way"). A domain that needs another's reads imports its reads.ts.
      "import-x/no-cycle": ["error", { ignoreExternal: true }],
      // tsc (noUnusedLocals/Parameters) already reports unused names; `_name` marks a deliberate one.
      "@typescript-eslint/no-unused-vars": [
        "error",
        { argsIgnorePattern: "^_", varsIgnorePattern: "^_", caughtErrorsIgnorePattern: "^_" },
      ],
    },
  },
  {
    // The browser side: React hooks' rules; no Node globals.
    files: ["src/**/*.{ts,tsx}"],
    ignores: ["src/domain/**", "src/schemas/**"],
    plugins: { "react-hooks": reactHooks },
    languageOptions: { globals: globals.browser },
    rules: {
      ...reactHooks.configs.recommended.rules,
      // Only says the React Compiler would skip a component (TanStack Virtual); we do not run the compiler.
      "react-hooks/incompatible-library": "off",
      // One clock on every page (DEVELOPERS.md "Every page keeps one clock"): times go through src/lib/clock.ts.
      "no-restricted-syntax": [
        "error",
        {
          selector: "CallExpression[callee.property.name=/^toLocale(Date|Time)String$/]",
          message: "Write times with src/lib/clock.ts (stamp, dateOf, clockTime, shortDay): 24-hour, ISO day.",
        },
        {
          selector: "CallExpression[callee.property.name='toLocaleString'][callee.object.type='NewExpression']",
          message: "Write times with src/lib/clock.ts (stamp, dateOf, clockTime, shortDay): 24-hour, ISO day.",
        },
      ],
    },
  },
  {
    // Pure code runs on both sides: neither the DOM nor Node's own modules.
    files: ["src/domain/**/*.ts", "src/schemas/**/*.ts"],
    rules: {
      "no-restricted-imports": [
        "error",
        { patterns: [{ group: ["node:*"], message: "src/domain and src/schemas run in the browser too." }] },
      ],
    },
  },
  {
    // Migrations are typed Kysely<any> on purpose: Kysely's migration guide says a migration must not
    // depend on today's schema types (db/types.ts changes; a frozen migration may not). Test bodies are
    // JSON answers read by field (tests/helpers/http.ts `Res<T = any>`), as API tests do.
    files: ["db/migrations/**/*.ts", "db/migrate.ts", "tests/**/*.ts", "e2e/**/*.ts"],
    rules: { "@typescript-eslint/no-explicit-any": "off" },
  },
  {
    // `declare global { namespace Express { interface Locals … } }` is how Express's types are extended.
    files: ["server/types.ts"],
    rules: { "@typescript-eslint/no-namespace": ["error", { allowDeclarations: true }] },
  },
  {
    files: ["server/**/*.ts", "db/**/*.{ts,mjs}", "tests/**/*.ts", "e2e/**/*.ts", "*.config.{ts,js}"],
    languageOptions: { globals: globals.node },
  },
  {
    // Not covered: server/cli and server/bench (scripts that write the bench's generated sites directly and
    // replay raw SQL as the baseline a figure is measured against), server/seed (writes the demo scenario
    // directly), server/health.ts (the readiness probe's `select 1` is a connection check, not data), db/
    // (migrations are frozen DDL), tests.
    files: ["server/**/*.ts"],
    ignores: [
      "server/**/repository.ts",
      "server/**/*-repository.ts",
      "server/cli/**",
      "server/bench/**",
      "server/seed/**",
      "server/health.ts",
    ],
    rules: { "no-restricted-syntax": ["error", ...QUERY_STATEMENTS] },
  },
);
