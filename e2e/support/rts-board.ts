import { expect, request, type APIRequestContext } from "@playwright/test";
import { DEMO_PASSWORD } from "./auth";

/** The demo curator signed in through the API, for setting up a test's own data. */
export async function curatorApi(baseURL: string): Promise<APIRequestContext> {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: { origin: baseURL } });
  const r = await api.post("/api/auth/sign-in", { data: { email: "curator@tideline.test", password: DEMO_PASSWORD } });
  expect(r.status()).toBe(200);
  return api;
}

/**
 * A small board of a test's own for return to service: two sections, one bus tie and one feeder breaker
 * (components come with the positions). Returns the board's id.
 */
export async function makeRtsBoard(
  api: APIRequestContext,
  siteId: string,
  names: { board: string; tie: string; feeder: string },
) {
  const ok = async (p: Promise<{ status(): number; json(): Promise<unknown> }>) => {
    const r = await p;
    expect(r.status(), JSON.stringify(await r.json())).toBe(201);
    return (await r.json()) as Record<string, any>;
  };
  const board = await ok(
    api.post(`/api/sites/${siteId}/boards`, {
      data: { name: names.board, nominalVolts: 450, gridRows: 2, gridCols: 4 },
    }),
  );
  const boardId = (board.board ?? board).id as string;
  const tie = await ok(api.post(`/api/sites/${siteId}/boards/${boardId}/sections`, { data: { name: "Bus tie" } }));
  const feeders = await ok(api.post(`/api/sites/${siteId}/boards/${boardId}/sections`, { data: { name: "Feeders" } }));
  const sectionId = (x: Record<string, any>) => (x.section ?? x).id as string;
  await ok(
    api.post(`/api/sites/${siteId}/boards/${boardId}/positions`, {
      data: { designation: names.tie, kind: "bus_tie", gridRow: 1, gridCol: 1, sectionId: sectionId(tie) },
    }),
  );
  await ok(
    api.post(`/api/sites/${siteId}/boards/${boardId}/positions`, {
      data: {
        designation: names.feeder,
        kind: "molded_case_breaker",
        gridRow: 2,
        gridCol: 1,
        circuit: "Steering gear",
        sectionId: sectionId(feeders),
      },
    }),
  );
  return boardId;
}
