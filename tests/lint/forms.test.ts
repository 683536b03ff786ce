/**
 * Every form in the client speaks with its own messages, beside the fields: the shared zod schema
 * (src/lib/form.ts) decides what is wrong. A `<form>` without `noValidate` lets the browser's own
 * check (a `required` or `min` attribute) pop its bubble first, in the browser's words and before
 * the form's message — so each `<form>` element of src/ must carry `noValidate`. Read with
 * TypeScript's own parser, so a multi-line opening tag or a handler with `>` in it is read right.
 */
import { readdirSync, readFileSync } from "node:fs";
import { join, relative } from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";
import { projectRoot } from "../../db/pg";

/** `file:line` of each `<form>` opening tag in `code` that has no `noValidate` attribute. */
function formsWithoutNoValidate(name: string, code: string): string[] {
  const source = ts.createSourceFile(name, code, ts.ScriptTarget.Latest, true, ts.ScriptKind.TSX);
  const out: string[] = [];
  const visit = (node: ts.Node) => {
    if (
      (ts.isJsxOpeningElement(node) || ts.isJsxSelfClosingElement(node)) &&
      node.tagName.getText(source) === "form" &&
      !node.attributes.properties.some((a) => ts.isJsxAttribute(a) && a.name.getText(source) === "noValidate")
    )
      out.push(`${name}:${source.getLineAndCharacterOfPosition(node.getStart(source)).line + 1}`);
    ts.forEachChild(node, visit);
  };
  visit(source);
  return out;
}

describe("forms", () => {
  it("the check finds a form without noValidate, across lines, and passes one with it", () => {
    const code = [
      "export const A = () => (",
      "  <form",
      "    onSubmit={(e) => e.preventDefault()}",
      '    className="grid"',
      "  >",
      "    <input required />",
      "  </form>",
      ");",
      "export const B = () => <form noValidate onSubmit={() => 1 > 0} />;",
    ].join("\n");
    expect(formsWithoutNoValidate("probe.tsx", code)).toEqual(["probe.tsx:2"]);
  });

  it("every <form> in src/ has noValidate, so the schema's message is the one a person reads", () => {
    const dir = join(projectRoot, "src");
    const files = readdirSync(dir, { recursive: true, encoding: "utf8" }).filter((f) => f.endsWith(".tsx"));
    const missing = files.flatMap((f) =>
      formsWithoutNoValidate(relative(projectRoot, join(dir, f)), readFileSync(join(dir, f), "utf8")),
    );
    expect(files.length).toBeGreaterThan(20);
    expect(missing).toEqual([]);
  });
});
