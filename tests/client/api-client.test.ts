import { afterEach, describe, expect, it, vi } from "vitest";
import { z } from "zod";
import { api } from "../../src/lib/api-client";

const tile = z.object({ id: z.string(), grade: z.number().int().min(0).max(5), note: z.string().default("") });
const answer = z.object({ board: z.object({ name: z.string() }), positions: z.array(tile), total: z.number() });
const answerWith = (positions: unknown[]) => ({ total: positions.length, board: { name: "B1", extra: 1 }, positions });
const serve = (body: unknown) =>
  vi.stubGlobal("fetch", async () => new Response(JSON.stringify(body), { status: 200 }));

describe("api.get checks a large answer in pieces (src/lib/api-client.ts)", () => {
  afterEach(() => vi.unstubAllGlobals());

  it("gives what schema.parse gives: defaults filled, unknown keys dropped, keys in the schema's order", async () => {
    const body = answerWith(
      Array.from({ length: 3000 }, (_, i) => ({ id: `p${i}`, grade: i % 6, ...(i % 2 ? { note: "n" } : {}), x: 1 })),
    );
    serve(body);
    const got = await api.get("/api/x", answer);
    const want = answer.parse(body);
    expect(got).toEqual(want);
    expect(JSON.stringify(got)).toBe(JSON.stringify(want));
  });

  it("throws the error schema.parse throws when one item among many is wrong", async () => {
    const positions = Array.from({ length: 500 }, (_, i) => ({ id: `p${i}`, grade: 1 }));
    positions[321] = { id: "p321", grade: 9 };
    const body = answerWith(positions);
    serve(body);
    const err = await api.get("/api/x", answer).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(z.ZodError);
    expect((err as z.ZodError).issues).toEqual(answer.safeParse(body).error!.issues);
  });
});
