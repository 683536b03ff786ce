/**
 * Property tests (fast-check) of every request schema: whatever arrives, parsing returns
 * an answer instead of throwing, and what it accepts PostgreSQL can store — no NUL, no
 * lone surrogate, no integer beyond int4, no date that does not exist.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { INT4_MAX, INT4_MIN, isStorableText } from "../../src/schemas/common";
import { nastyBody, requestSchemas } from "../helpers/nasty";

function* leaves(v: unknown, path = ""): Generator<[string, unknown]> {
  if (Array.isArray(v)) for (const [i, x] of v.entries()) yield* leaves(x, `${path}[${i}]`);
  else if (v && typeof v === "object" && !(v instanceof Date))
    for (const [k, x] of Object.entries(v)) yield* leaves(x, path ? `${path}.${k}` : k);
  else yield [path, v];
}

const schemas = requestSchemas();

describe("request schemas under hostile input", () => {
  it("there are request schemas to test (every module's …Body/…Query/…Patch)", () => {
    expect(schemas.length).toBeGreaterThan(30);
  });

  it.each(schemas)("%s: never throws, and accepts only storable values", (_name, schema) => {
    fc.assert(
      fc.property(nastyBody, (body) => {
        const r = schema.safeParse(body);
        if (!r.success) {
          expect(r.error.issues.length).toBeGreaterThan(0);
          return;
        }
        for (const [path, v] of leaves(r.data)) {
          if (typeof v === "string") expect(isStorableText(v), `${path} = ${JSON.stringify(v)}`).toBe(true);
          if (
            typeof v === "number" &&
            Number.isInteger(v) &&
            /version|count|qty|row|col|span|order|page|size|limit|offset/i.test(path)
          )
            expect(v >= INT4_MIN && v <= INT4_MAX, `${path} = ${v}`).toBe(true);
        }
      }),
      { numRuns: 150 },
    );
  });
});
