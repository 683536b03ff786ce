/**
 * The outbox engine: order, retry with backoff, idempotency keys, conflicts and refusals.
 * Outcome classes follow RFC 9110 (§15.5 client errors are not retried as they are; §15.6 server
 * errors and 408/429 may be) and the IETF HTTPAPI Idempotency-Key draft (409 = request in progress).
 */
import { describe, expect, it } from "vitest";
import {
  BACKOFF_BASE_MS,
  BACKOFF_MAX_MS,
  backoffMs,
  createdIdOf,
  drain,
  resubmitted,
  type OutboxItem,
  type OutboxStore,
  type SendResult,
  type Transport,
} from "../../src/lib/outbox/queue";

function memoryStore(items: OutboxItem[] = []): OutboxStore & { map: Map<string, OutboxItem> } {
  const map = new Map(items.map((i) => [i.id, i]));
  return {
    map,
    all: async () => [...map.values()],
    put: async (i) => void map.set(i.id, i),
    remove: async (id) => void map.delete(id),
  };
}

let seq = 0;
const item = (over: Partial<OutboxItem> = {}): OutboxItem => ({
  id: `key-${++seq}`,
  userId: "u1",
  siteId: "s1",
  seq,
  createdAt: "2026-12-02T10:00:00Z",
  label: `Inspection ${seq}`,
  kind: "inspection",
  method: "POST",
  url: "/api/sites/s1/components/c1/inspections",
  body: { percentRusted: seq },
  state: "waiting",
  attempts: 0,
  nextAttemptAt: 0,
  ...over,
});

/** A fake server that remembers keys like server/idempotency does: a repeat gets the first answer. */
function fakeServer(answer: (i: OutboxItem, n: number) => SendResult | "store") {
  const rows = new Map<string, unknown>();
  const calls: Array<{ key: string; body: unknown }> = [];
  const send: Transport = async (i) => {
    calls.push({ key: i.id, body: i.body ?? i.photo?.fields });
    if (rows.has(i.id)) return { ok: true, status: 201, body: rows.get(i.id) };
    const a = answer(i, calls.length);
    if (a === "store") {
      const created = { id: `row-${rows.size + 1}` };
      rows.set(i.id, created);
      return { ok: true, status: 201, body: created };
    }
    return a;
  };
  return { send, rows, calls };
}
const offline: SendResult = { ok: false, status: 0, error: { status: 0, code: "offline", message: "No signal" } };

describe("createdIdOf", () => {
  it("finds the new record in each create's answer (a custody answer names the move, not the component)", () => {
    expect(createdIdOf({ id: "i1" })).toBe("i1");
    expect(createdIdOf({ component: { id: "c1" }, move: { id: "m1" } })).toBe("m1");
    expect(createdIdOf({ photos: [{ id: "p1" }] })).toBe("p1");
    expect(createdIdOf({ reading: { id: "r1" } })).toBe("r1");
    expect(createdIdOf({ nothing: true })).toBeNull();
    // The other field creates: a defect, a thermal scan, a watch check with the incidents it raised.
    expect(createdIdOf({ defect: { id: "d1", ref: 7 } })).toBe("d1");
    expect(createdIdOf({ scan: { id: "t1" } })).toBe("t1");
    expect(createdIdOf({ check: { id: "w1" }, incidents: [{ id: "x1", defectId: "d9" }] })).toBe("w1");
  });
});

describe("outbox drain", () => {
  it("sends a person's items oldest first and empties the outbox", async () => {
    const a = item(),
      b = item(),
      c = item();
    const store = memoryStore([c, a, b]);
    const srv = fakeServer(() => "store");
    const r = await drain(store, "u1", srv.send);
    expect(srv.calls.map((x) => x.key)).toEqual([a.id, b.id, c.id]);
    expect(r.sent).toHaveLength(3);
    expect(store.map.size).toBe(0);
  });

  it("never sends another person's items (a queue belongs to who made it)", async () => {
    const mine = item(),
      theirs = item({ userId: "u2" });
    const store = memoryStore([mine, theirs]);
    const srv = fakeServer(() => "store");
    await drain(store, "u1", srv.send);
    expect(srv.calls.map((x) => x.key)).toEqual([mine.id]);
    expect(store.map.has(theirs.id)).toBe(true);
  });

  it("stops at the first item without an answer, keeps the order and backs off", async () => {
    const a = item(),
      b = item();
    const store = memoryStore([a, b]);
    const srv = fakeServer(() => offline);
    const r = await drain(store, "u1", srv.send, { now: () => 1_000, random: () => 0.5 });
    expect(srv.calls).toHaveLength(1);
    expect(r.stoppedAt?.id).toBe(a.id);
    expect(r.retryAt).toBe(1_000 + BACKOFF_BASE_MS);
    expect(store.map.get(a.id)).toMatchObject({
      attempts: 1,
      state: "waiting",
      nextAttemptAt: 1_000 + BACKOFF_BASE_MS,
    });
    // Before its time nothing is sent; "sync now" (force) sends at once.
    await drain(store, "u1", srv.send, { now: () => 1_500 });
    expect(srv.calls).toHaveLength(1);
    await drain(store, "u1", srv.send, { now: () => 1_500, force: true });
    expect(srv.calls).toHaveLength(2);
  });

  it("backoff doubles from 2 s up to 5 minutes, with ±20 % jitter", () => {
    expect([1, 2, 3, 4].map((n) => backoffMs(n, () => 0.5))).toEqual([2_000, 4_000, 8_000, 16_000]);
    expect(backoffMs(30, () => 0.5)).toBe(BACKOFF_MAX_MS);
    expect(backoffMs(1, () => 0)).toBe(1_600);
    expect(backoffMs(1, () => 1)).toBe(2_400);
  });

  it("a lost answer is sent again with the same key, and the server keeps one row", async () => {
    const a = item();
    const store = memoryStore([a]);
    let dropAnswer = true;
    const srv = fakeServer(() => "store");
    // The request reaches the server and is stored, but the answer is lost on the way back.
    const lossy: Transport = async (i, p) => {
      const r = await srv.send(i, p);
      if (dropAnswer) {
        dropAnswer = false;
        return offline;
      }
      return r;
    };
    await drain(store, "u1", lossy, { now: () => 0 });
    expect(store.map.size).toBe(1);
    await drain(store, "u1", lossy, { force: true });
    expect(store.map.size).toBe(0);
    expect(srv.calls.map((c) => c.key)).toEqual([a.id, a.id]);
    expect(srv.rows.size).toBe(1);
  });

  it("5xx, 408, 429 and 409 'in use' are retried; 400, 403, 404 and 422 are kept with the reason", async () => {
    for (const status of [500, 503, 408, 429]) {
      const a = item();
      const store = memoryStore([a]);
      await drain(store, "u1", async () => ({ ok: false, status, error: { status, code: "x", message: "m" } }));
      expect(store.map.get(a.id)).toMatchObject({ state: "waiting", attempts: 1 });
    }
    const busy = item();
    const s2 = memoryStore([busy]);
    await drain(s2, "u1", async () => ({
      ok: false,
      status: 409,
      error: { status: 409, code: "idempotency_key_in_use", message: "busy" },
    }));
    expect(s2.map.get(busy.id)).toMatchObject({ state: "waiting", attempts: 1 });
    for (const status of [400, 403, 404, 422]) {
      const a = item(),
        b = item();
      const store = memoryStore([a, b]);
      const r = await drain(store, "u1", async (i) =>
        i.id === a.id
          ? { ok: false, status, error: { status, code: "no", message: `refused ${status}` } }
          : { ok: true, status: 201, body: { id: "x" } },
      );
      expect(store.map.get(a.id)).toMatchObject({ state: "refused", error: { message: `refused ${status}` } });
      expect(r.sent.map((x) => x.id)).toEqual([b.id]); // a refusal does not hold the others back
      // Refused items stay until the person acts: a later drain does not send them again.
      const again = await drain(store, "u1", async () => ({ ok: true, status: 201, body: {} }));
      expect(again.sent).toEqual([]);
    }
  });

  it("a 409 with the server's current record is a conflict, kept side by side; choosing mine sends it again", async () => {
    const move = item({ kind: "custody", body: { toState: "removed", version: 3 } });
    const store = memoryStore([move]);
    const current = { id: "c1", custody: "in_workshop", version: 4 };
    const r = await drain(store, "u1", async () => ({
      ok: false,
      status: 409,
      error: { status: 409, code: "stale", message: "Changed meanwhile", current },
    }));
    expect(r.conflicts).toHaveLength(1);
    expect(store.map.get(move.id)).toMatchObject({ state: "conflict", error: { current } });
    const mine = resubmitted(store.map.get(move.id)!, { toState: "removed", version: 4 }, 10);
    await store.put(mine);
    const srv = fakeServer(() => "store");
    await drain(store, "u1", srv.send, { now: () => 10 });
    expect(srv.calls).toEqual([{ key: move.id, body: { toState: "removed", version: 4 } }]);
    expect(store.map.size).toBe(0);
  });

  it("an offline edit (PATCH with its version) that meets a newer record is kept as a conflict; the person's choice goes with the same key and the current version", async () => {
    const edit = item({
      kind: "defect_edit",
      method: "PATCH",
      url: "/api/sites/s1/defects/d1",
      edit: {},
      body: { title: "Bolt sheared", severity: "degraded", version: 2 },
    });
    const after = item();
    const store = memoryStore([edit, after]);
    const current = { id: "d1", title: "Bolt loose", severity: "disabling", version: 3 };
    const srv = fakeServer((i) =>
      i.method === "PATCH"
        ? { ok: false, status: 409, error: { status: 409, code: "conflict", message: "Changed meanwhile", current } }
        : "store",
    );
    const r = await drain(store, "u1", srv.send);
    expect(r.conflicts.map((c) => c.id)).toEqual([edit.id]);
    expect(store.map.get(edit.id)).toMatchObject({ state: "conflict", method: "PATCH", error: { current } });
    // The inspection made after it is not held back by a conflict the person has to decide.
    expect(r.sent.map((c) => c.id)).toEqual([after.id]);
    // Chosen: my title, the server's severity (left out, so it stays), at the version now current.
    await store.put(resubmitted(store.map.get(edit.id)!, { title: "Bolt sheared", version: 3 }, 5));
    const ok = fakeServer(() => ({ ok: true, status: 200, body: { defect: { id: "d1", version: 4 } } }));
    await drain(store, "u1", ok.send, { now: () => 5 });
    expect(ok.calls).toEqual([{ key: edit.id, body: { title: "Bolt sheared", version: 3 } }]);
    expect(store.map.size).toBe(0);
  });

  it("two edits of one defect made with no signal go one after the other: the second builds on the first's new version, not a conflict with it", async () => {
    const defectEdit = (body: Record<string, unknown>, url = "/api/sites/s1/defects/d1") =>
      item({ kind: "defect_edit", method: "PATCH", url, edit: {}, body });
    const first = defectEdit({ title: "Bolt sheared", version: 2 });
    const move = item({
      kind: "defect_status",
      method: "POST",
      url: "/api/sites/s1/defects/d1/status",
      edit: { compareAs: { to: "status" } },
      body: { to: "scheduled", reason: "", version: 2 },
    });
    const otherDefect = defectEdit({ title: "Lamp cracked", version: 2 }, "/api/sites/s1/defects/d2");
    const store = memoryStore([first, move, otherDefect]);
    // A server that keeps one version per defect and refuses a stale one, as server/defects does.
    const versions = new Map([
      ["d1", 2],
      ["d2", 7],
    ]);
    const srv = fakeServer((i) => {
      const id = i.url.split("/")[5];
      const sent = (i.body as { version: number }).version;
      if (sent !== versions.get(id)) {
        const current = { id, version: versions.get(id) };
        return {
          ok: false,
          status: 409,
          error: { status: 409, code: "conflict", message: "Changed meanwhile", current },
        };
      }
      versions.set(id, sent + 1);
      return { ok: true, status: 200, body: { defect: { id, version: sent + 1 } } };
    });
    const r = await drain(store, "u1", srv.send);
    expect(r.sent.map((i) => i.id)).toEqual([first.id, move.id]);
    expect(srv.calls.map((c) => (c.body as { version: number }).version)).toEqual([2, 3, 2]);
    // The other defect was changed by someone else meanwhile (version 7): that one is still a conflict.
    expect(r.conflicts.map((i) => i.id)).toEqual([otherDefect.id]);
  });

  it("a photo of an inspection logged offline waits for it, then goes with the new inspection's id", async () => {
    const insp = item();
    const photo = item({
      kind: "photo",
      body: undefined,
      photo: { blob: new Blob(["x"]), name: "p.jpg", fields: { kind: "damage" } },
      dependsOn: { itemId: insp.id, field: "inspectionId" },
    });
    const store = memoryStore([photo, insp]);
    const srv = fakeServer(() => "store");
    await drain(store, "u1", srv.send);
    expect(srv.calls).toEqual([
      { key: insp.id, body: insp.body },
      { key: photo.id, body: { kind: "damage", inspectionId: "row-1" } },
    ]);
  });

  it("a photo whose inspection was discarded is kept, refused, with the reason", async () => {
    const photo = item({
      kind: "photo",
      photo: { blob: new Blob(["x"]), name: "p.jpg", fields: {} },
      dependsOn: { itemId: "gone", field: "inspectionId" },
    });
    const store = memoryStore([photo]);
    await drain(store, "u1", fakeServer(() => "store").send);
    expect(store.map.get(photo.id)).toMatchObject({ state: "refused", error: { code: "parent_discarded" } });
  });

  it("a reading, a watch check, a defect and its photo go in the order made; a lost answer is repeated with its key and makes one row", async () => {
    const reading = item({
      kind: "insulation",
      url: "/api/sites/s1/boards/b1/insulation-readings",
      body: { megohms: 85 },
    });
    const watch = item({
      kind: "watch_check",
      url: "/api/sites/s1/return-to-service/stages/st1/watch-checks",
      body: { at: "2026-12-02T10:05:00Z", lamps: "equal" },
    });
    const defect = item({ kind: "defect", url: "/api/sites/s1/defects", body: { title: "Verdigris" } });
    const photo = item({
      kind: "photo",
      body: undefined,
      photo: { blob: new Blob(["x"]), name: "v.jpg", fields: { kind: "damage" } },
      dependsOn: { itemId: defect.id, field: "defectId" },
    });
    const store = memoryStore([photo, defect, watch, reading]);
    // The watch check reaches the server but its answer is lost: stored there, "no answer" here.
    let lostOnce = false;
    const srv = fakeServer(() => "store");
    const flaky: Transport = async (i, p) => {
      const r = await srv.send(i, p);
      if (i.id === watch.id && !lostOnce) {
        lostOnce = true;
        return offline;
      }
      return r;
    };
    const first = await drain(store, "u1", flaky, { now: () => 0, random: () => 0.5 });
    expect(first.sent.map((i) => i.id)).toEqual([reading.id]);
    expect(first.stoppedAt?.id).toBe(watch.id); // nothing overtakes it
    const second = await drain(store, "u1", flaky, { now: () => 1_000_000 });
    expect(second.sent.map((i) => i.id)).toEqual([watch.id, defect.id, photo.id]);
    expect(srv.rows.size).toBe(4); // the repeated watch check answered from its key: no second row
    expect(srv.calls.map((c) => c.key)).toEqual([reading.id, watch.id, watch.id, defect.id, photo.id]);
    expect(srv.rows.get(defect.id)).toEqual({ id: "row-3" });
    expect(srv.calls.at(-1)!.body).toEqual({ kind: "damage", defectId: "row-3" }); // the photo is filed to the new defect
    expect(store.map.size).toBe(0);
  });

  it("a watch check the server refuses (the stage is no longer live) stays with its reason; the rest still go", async () => {
    const watch = item({ kind: "watch_check", body: { lamps: "equal" } });
    const reading = item({ kind: "thermal", body: { componentTempC: 40 } });
    const store = memoryStore([watch, reading]);
    const srv = fakeServer((i) =>
      i.id === watch.id
        ? {
            ok: false,
            status: 409,
            error: { status: 409, code: "not_live", message: "Watch checks are recorded while the stage is live." },
          }
        : "store",
    );
    const r = await drain(store, "u1", srv.send);
    expect(r.refused.map((i) => i.id)).toEqual([watch.id]);
    expect(r.sent.map((i) => i.id)).toEqual([reading.id]);
    expect(store.map.get(watch.id)).toMatchObject({ state: "refused", error: { code: "not_live" } });
  });
});
