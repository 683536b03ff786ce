/**
 * The client and the server are type-checked with different libraries (tsconfig.app.json: DOM, no Node;
 * tsconfig.server.json: Node, no DOM; tsconfig.node.json: both, for tests that drive a browser). Each case
 * compiles one made-up file, held in memory at a path inside the part it probes, with that part's own
 * options, so a config change that lets `document` into the server or `Buffer` into the client fails here.
 */
import { readdirSync } from "node:fs";
import { join, relative } from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";
import { projectRoot } from "../../db/pg";

const CONFIGS = { client: "tsconfig.app.json", server: "tsconfig.server.json", e2e: "tsconfig.node.json" } as const;
type Part = keyof typeof CONFIGS;
const PARTS = Object.keys(CONFIGS) as Part[];

function parsed(part: Part) {
  const file = join(projectRoot, CONFIGS[part]);
  const config = ts.getParsedCommandLineOfConfigFile(
    file,
    {},
    {
      ...ts.sys,
      onUnRecoverableConfigFileDiagnostic: (d) => {
        throw new Error(ts.flattenDiagnosticMessageText(d.messageText, "\n"));
      },
    },
  );
  if (!config) throw new Error(`${file} could not be read`);
  return config;
}
const configs = Object.fromEntries(PARTS.map((p) => [p, parsed(p)])) as Record<Part, ts.ParsedCommandLine>;

/** The type errors of `code` compiled alone as `at` (a path in the repository) with a part's options. */
function errorsOf(part: Part, at: string, code: string): string[] {
  const { options } = configs[part];
  const path = join(projectRoot, at);
  const host = ts.createCompilerHost(options);
  const getSourceFile = host.getSourceFile.bind(host);
  host.getSourceFile = (name, lang, ...rest) =>
    name === path ? ts.createSourceFile(name, code, lang) : getSourceFile(name, lang, ...rest);
  const fileExists = host.fileExists.bind(host);
  host.fileExists = (name) => name === path || fileExists(name);
  const program = ts.createProgram([path], options, host);
  return ts
    .getPreEmitDiagnostics(program)
    .filter((d) => d.file?.fileName === path)
    .map((d) => ts.flattenDiagnosticMessageText(d.messageText, "\n"));
}

/** Every TypeScript file under `dir` (relative to the repository), skipping what the build ignores. */
function sources(dir: string): string[] {
  return readdirSync(join(projectRoot, dir), { recursive: true, encoding: "utf8" })
    .filter((f) => /\.tsx?$/.test(f) && !f.includes("node_modules"))
    .map((f) => join(projectRoot, dir, f));
}
const rootsOf = (part: Part) => new Set(configs[part].fileNames);

// Each case builds a program that reads the standard library's declarations afresh: seconds apiece on a busy machine.
describe("separate type libraries for the client and the server", { timeout: 120_000 }, () => {
  it("a server file that uses the DOM's document does not compile", () => {
    expect(errorsOf("server", "server/probe.ts", "export const title = document.title;\n").join("\n")).toMatch(
      /Cannot find name 'document'/,
    );
  });

  it("a client file that uses Node's Buffer does not compile", () => {
    expect(errorsOf("client", "src/lib/probe.ts", 'export const bytes = Buffer.from("x");\n').join("\n")).toMatch(
      /Cannot find name 'Buffer'/,
    );
  });

  it("each side still has its own: Buffer on the server, document in the client, both in e2e", () => {
    expect(errorsOf("server", "server/probe.ts", 'export const bytes = Buffer.from("x");\n')).toEqual([]);
    expect(errorsOf("client", "src/lib/probe.ts", "export const title = document.title;\n")).toEqual([]);
    const both = 'export const t = document.title;\nexport const b = Buffer.from("x");\n';
    expect(errorsOf("e2e", "e2e/probe.ts", both)).toEqual([]);
  });

  it("every file of src/ is checked as client code, every file of server/ and db/ as server code", () => {
    const client = rootsOf("client");
    const server = rootsOf("server");
    const missing = [
      ...sources("src").filter((f) => !client.has(f) || server.has(f)),
      ...[...sources("server"), ...sources("db")].filter((f) => !server.has(f) || client.has(f)),
    ];
    expect(missing.map((f) => relative(projectRoot, f))).toEqual([]);
  });

  it("every TypeScript file of the repository is in one of the parts", () => {
    const all = new Set(PARTS.flatMap((p) => configs[p].fileNames));
    const top = readdirSync(projectRoot).filter((f) => /\.tsx?$/.test(f));
    const files = [...sources("src"), ...sources("server"), ...sources("db"), ...sources("tests"), ...sources("e2e")];
    const loose = [...files, ...top.map((f) => join(projectRoot, f))].filter((f) => !all.has(f));
    expect(loose.map((f) => relative(projectRoot, f))).toEqual([]);
  });
});
