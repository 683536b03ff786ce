import exifr from "exifr";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import sharp from "sharp";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { LocalDiskStorage } from "../../server/photos/storage/local-disk";
import { createTestDb, type TestDb } from "../helpers/db";
import { makeCrew } from "../helpers/fixtures";
import { startTestServer, type Client, type TestServer } from "../helpers/http";
import { form, makeBoard, noisyJpeg, plainPng, pngPixelBomb, sidewaysJpegWithGps } from "../helpers/photo-fixtures";

let t: TestDb;
let server: TestServer;
let dir: string;
let storage: LocalDiskStorage;
let fx: Awaited<ReturnType<typeof makeCrew>>;
let board: Awaited<ReturnType<typeof makeBoard>>;
const as: Record<string, Client> = {};

beforeAll(async () => {
  t = await createTestDb();
  dir = await mkdtemp(join(tmpdir(), "tideline-photos-"));
  storage = new LocalDiskStorage(dir);
  server = await startTestServer({ db: t.db, photoStorage: storage });
  fx = await makeCrew(t.db);
  board = await makeBoard(t.db, fx.siteId, ["1-1", "1-2", "2-14"]);
  for (const role of ["curator", "photographer", "volunteer", "viewer", "outsider"] as const) {
    as[role] = server.client();
    await as[role].signIn(fx.crew[role].email);
  }
});
afterAll(async () => {
  await server.close();
  await t.drop();
  await rm(dir, { recursive: true, force: true });
});

const url = (p = "") => `/api/sites/${fx.siteId}/photos${p}`;
/** Uploads, then waits for the background job to make the renditions (as the client's refetch does). */
const upload = async (c: Client, files: Parameters<typeof form>[0], fields: Record<string, string> = {}) => {
  const r = await c.call("POST", url(), form(files, fields));
  await server.jobsIdle();
  return r;
};
const rowCount = async () =>
  Number(
    (
      await t.db
        .selectFrom("photos")
        .select((eb) => eb.fn.countAll().as("n"))
        .executeTakeFirstOrThrow()
    ).n,
  );
const bytesOf = async (c: Client, path: string) => {
  const res = await fetch(server.base + path, { headers: { cookie: c.cookie } });
  return { status: res.status, headers: res.headers, body: Buffer.from(await res.arrayBuffer()) };
};

describe("upload and renditions", () => {
  it("a sideways JPEG with GPS is stored upright, and its renditions carry no EXIF and no GPS (checked with exifr)", async () => {
    const original = await sidewaysJpegWithGps();
    // The fixture really carries what must be stripped, or this test could not fail.
    expect(await exifr.gps(original)).toMatchObject({ latitude: expect.closeTo(51.5034, 3) });
    const r = await upload(as.photographer, [{ name: "IMG_0001.jpg", data: original }], {
      positionId: board.positions["1-1"].id,
      kind: "as_found",
    });
    expect(r.status).toBe(201);
    const p = r.body.photos[0];
    expect(p).toMatchObject({
      width: 200,
      height: 400,
      format: "jpeg",
      cameraModel: "Testcam Deckhand 7",
      boardId: board.boardId,
      designation: "1-1",
      kind: "as_found",
    });
    expect(p.capturedAt).toMatch(/^2026-11-0[23]T/);
    // The upload answers once the original is stored; the job then makes the renditions.
    expect(p.renditionState).toBe("processing");
    expect((await as.viewer.get(url(`/${p.id}`))).body.photo).toMatchObject({
      renditionState: "ready",
      renditionError: null,
    });
    for (const rendition of ["display", "thumb"]) {
      const img = await bytesOf(as.viewer, url(`/${p.id}/${rendition}`));
      expect(img.status).toBe(200);
      expect(img.headers.get("cache-control")).toMatch(/private/);
      const meta = await sharp(img.body).metadata();
      expect([meta.format, meta.exif, meta.orientation ?? 1]).toEqual(["jpeg", undefined, 1]);
      expect(await exifr.parse(img.body)).toBeUndefined();
      expect(await exifr.gps(img.body)).toBeUndefined();
      // Upright: red (the stored left half) is now on top, blue below.
      const { data, info } = await sharp(img.body).raw().toBuffer({ resolveWithObject: true });
      expect(info.height).toBeGreaterThan(info.width);
      const px = (x: number, y: number) => [...data.subarray((y * info.width + x) * 3, (y * info.width + x) * 3 + 3)];
      expect(px(Math.floor(info.width / 2), Math.floor(info.height / 4))[0]).toBeGreaterThan(150);
      expect(px(Math.floor(info.width / 2), Math.floor((3 * info.height) / 4))[2]).toBeGreaterThan(150);
    }
    const orig = await bytesOf(as.curator, url(`/${p.id}/original`));
    expect(orig.status).toBe(200);
    expect(orig.body.equals(original)).toBe(true);
  });

  it("the display rendition is at most 1600 px and the thumbnail at most 320 px; small pictures are not blown up", async () => {
    const big = await noisyJpeg(2400, 1200);
    const r = await upload(as.photographer, [
      { name: "wide.jpg", data: big },
      { name: "small.png", data: await plainPng() },
    ]);
    expect(r.status).toBe(201);
    const [wide, small] = ["wide.jpg", "small.png"].map((n) =>
      r.body.photos.find((p: { originalName: string }) => p.originalName === n),
    );
    const dims = async (id: string, rendition: string) =>
      sharp((await bytesOf(as.viewer, url(`/${id}/${rendition}`))).body).metadata();
    expect(await dims(wide.id, "display")).toMatchObject({ width: 1600, height: 800 });
    expect(await dims(wide.id, "thumb")).toMatchObject({ width: 320, height: 160 });
    expect(await dims(small.id, "display")).toMatchObject({ width: 64, height: 48 });
  });
});

describe("rendition failures", () => {
  it("a picture whose header reads but whose pixels do not is stored, then shown as not processed with the reason", async () => {
    const whole = await noisyJpeg();
    // Half the data, then the end-of-image marker, so the upload's quick checks pass.
    const damaged = Buffer.concat([whole.subarray(0, Math.floor(whole.length / 2)), Buffer.from([0xff, 0xd9])]);
    const r = await upload(as.photographer, [{ name: "half.jpg", data: damaged }]);
    expect(r.status).toBe(201);
    const photo = (await as.viewer.get(url(`/${r.body.photos[0].id}`))).body.photo;
    expect(photo).toMatchObject({
      renditionState: "failed",
      renditionError: expect.stringMatching(/damaged or cut short/),
    });
    const thumb = await as.viewer.get(url(`/${photo.id}/thumb`));
    expect(thumb.status).toBe(409);
    expect(thumb.body.error.code).toBe("rendition_failed");
    // The original is kept for the photographer and the curator.
    expect((await bytesOf(as.curator, url(`/${photo.id}/original`))).body.equals(damaged)).toBe(true);
  });
});

describe("HEIF container", () => {
  it("an AV1-compressed HEIF (which sharp decodes itself) is accepted as heif; HEVC goes through heic-decode (not tested: no sample file)", async () => {
    const heif = await sharp({ create: { width: 120, height: 80, channels: 3, background: "#345" } })
      .heif({ compression: "av1" })
      .toBuffer();
    const r = await upload(as.photographer, [{ name: "phone.heic", data: heif, type: "image/heic" }]);
    expect(r.status).toBe(201);
    expect(r.body.photos[0]).toMatchObject({ format: "heif", width: 120, height: 80 });
  });
});

describe("refused uploads leave nothing behind", () => {
  let rowsBefore = 0;
  let keysBefore: string[] = [];
  const snapshot = async () => {
    rowsBefore = await rowCount();
    keysBefore = await storage.listKeys();
  };
  afterEach(async () => {
    expect(await rowCount()).toBe(rowsBefore);
    expect(await storage.listKeys()).toEqual(keysBefore);
  });

  it("a text file renamed .jpg gets 415 with a clear message", async () => {
    await snapshot();
    const r = await upload(as.photographer, [
      { name: "notes.jpg", data: Buffer.from("breaker 2-14 seized, see photo\n".repeat(50)) },
    ]);
    expect(r.status).toBe(415);
    expect(r.body.error.message).toMatch(/notes\.jpg.*JPEG, PNG, WebP, HEIC/);
  });

  it("an SVG drawing is refused with 415 even though sharp could render it", async () => {
    await snapshot();
    const svg = Buffer.from(
      '<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><rect width="10" height="10"/></svg>',
    );
    const r = await upload(as.photographer, [{ name: "board.jpg", data: svg, type: "image/jpeg" }]);
    expect(r.status).toBe(415);
  });

  it("a file over 40 MB gets 413", async () => {
    await snapshot();
    const r = await upload(as.photographer, [{ name: "huge.jpg", data: Buffer.alloc(40 * 1024 * 1024 + 10, 0xff) }]);
    expect(r.status).toBe(413);
    expect(r.body.error.code).toBe("too_large");
  });

  it("more than 20 files in one request gets 413", async () => {
    await snapshot();
    const png = await plainPng();
    const r = await upload(
      as.photographer,
      Array.from({ length: 21 }, (_, i) => ({ name: `p${i}.png`, data: png })),
    );
    expect(r.status).toBe(413);
  });

  it("a pixel bomb (900 MP claimed in a tiny PNG) is refused with 413", async () => {
    await snapshot();
    const r = await upload(as.photographer, [{ name: "bomb.png", data: pngPixelBomb() }]);
    expect(r.status).toBe(413);
    expect(r.body.error.code).toBe("too_many_pixels");
  });

  it("a JPEG cut in half gets 400 'damaged or cut short'", async () => {
    await snapshot();
    const whole = await noisyJpeg();
    const r = await upload(as.photographer, [
      { name: "half.jpg", data: whole.subarray(0, Math.floor(whole.length / 2)) },
    ]);
    expect(r.status).toBe(400);
    expect(r.body.error.message).toMatch(/cut short/);
  });

  it("one bad file in a batch refuses the whole batch", async () => {
    await snapshot();
    const r = await upload(as.photographer, [
      { name: "good.png", data: await plainPng() },
      { name: "bad.jpg", data: Buffer.from("nope") },
    ]);
    expect(r.status).toBe(415);
  });

  it("when storage fails on a later file, no row is written and the originals already stored are deleted", async () => {
    await snapshot();
    const flaky = new LocalDiskStorage(dir);
    let n = 0;
    flaky.putFile = async (k: string, path: string, c: string) => {
      if (++n === 2) throw new Error("disk full");
      return LocalDiskStorage.prototype.putFile.call(flaky, k, path, c);
    };
    const other = await startTestServer({ db: t.db, photoStorage: flaky });
    const c = other.client();
    await c.signIn(fx.crew.photographer.email);
    const png = await plainPng();
    const r = await c.call(
      "POST",
      url(),
      form([
        { name: "a.png", data: png },
        { name: "b.png", data: png },
      ]),
    );
    await other.close();
    expect(r.status).toBe(503);
    expect(n).toBe(2);
  });

  it("a request without files gets 400", async () => {
    await snapshot();
    const r = await as.photographer.call("POST", url(), form([], { kind: "as_found" }));
    expect(r.status).toBe(400);
  });
});

describe("who may do what", () => {
  let photoId = "";
  beforeAll(async () => {
    const r = await upload(as.photographer, [{ name: "rules.png", data: await plainPng() }], {
      positionId: board.positions["1-2"].id,
    });
    photoId = r.body.photos[0].id;
  });

  it("a member of another site gets 404 for the list, the picture and the upload", async () => {
    expect((await as.outsider.get(url())).status).toBe(404);
    expect((await bytesOf(as.outsider, url(`/${photoId}/thumb`))).status).toBe(404);
    expect((await upload(as.outsider, [{ name: "x.png", data: await plainPng() }])).status).toBe(404);
  });

  it("a signed-out request for a picture gets 401", async () => {
    expect((await fetch(server.base + url(`/${photoId}/display`))).status).toBe(401);
  });

  it("a viewer sees thumbnails but may not upload (403) nor download the original with its GPS (403)", async () => {
    expect((await bytesOf(as.viewer, url(`/${photoId}/thumb`))).status).toBe(200);
    expect((await upload(as.viewer, [{ name: "x.png", data: await plainPng() }])).status).toBe(403);
    expect((await bytesOf(as.viewer, url(`/${photoId}/original`))).status).toBe(403);
  });

  it("a volunteer may attach a photo to their own inspection but not to someone else's or a bare position", async () => {
    const pos = board.positions["2-14"];
    const mine = await t.db
      .insertInto("inspections")
      .values({
        siteId: fx.siteId,
        componentId: pos.componentId,
        positionId: pos.id,
        inspectorId: fx.crew.volunteer.id,
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    const theirs = await t.db
      .insertInto("inspections")
      .values({ siteId: fx.siteId, componentId: pos.componentId, positionId: pos.id, inspectorId: fx.crew.curator.id })
      .returning("id")
      .executeTakeFirstOrThrow();
    const png = await plainPng();
    const ok = await upload(as.volunteer, [{ name: "v.png", data: png }], { inspectionId: mine.id, kind: "damage" });
    expect(ok.status).toBe(201);
    expect(ok.body.photos[0]).toMatchObject({
      inspectionId: mine.id,
      positionId: pos.id,
      componentId: pos.componentId,
      boardId: board.boardId,
    });
    expect((await upload(as.volunteer, [{ name: "v.png", data: png }], { inspectionId: theirs.id })).status).toBe(403);
    expect((await upload(as.volunteer, [{ name: "v.png", data: png }], { positionId: pos.id })).status).toBe(403);
  });

  it("only the curator deletes: the photographer gets 403; after the curator's delete the photo is gone from lists and pictures", async () => {
    expect((await as.photographer.del(url(`/${photoId}`))).status).toBe(403);
    expect((await as.curator.del(url(`/${photoId}`))).status).toBe(200);
    expect((await as.viewer.get(url(`?positionId=${board.positions["1-2"].id}`))).body.photos).toEqual([]);
    expect((await bytesOf(as.viewer, url(`/${photoId}/thumb`))).status).toBe(404);
    const row = await t.db.selectFrom("photos").select("deletedAt").where("id", "=", photoId).executeTakeFirstOrThrow();
    expect(row.deletedAt).toBeInstanceOf(Date);
  });

  it("a position on another site is refused as a target (400)", async () => {
    const foreign = await makeBoard(t.db, fx.otherSiteId, ["9-9"], "Their board");
    const r = await upload(as.photographer, [{ name: "x.png", data: await plainPng() }], {
      positionId: foreign.positions["9-9"].id,
    });
    expect(r.status).toBe(400);
    expect(r.body.error.fields.positionId).toBeDefined();
  });
});

describe("tagging, bulk assignment and the shoot list", () => {
  const newPhotos = async (n: number) => {
    const png = await plainPng();
    const r = await upload(
      as.photographer,
      Array.from({ length: n }, (_, i) => ({ name: `shoot-${i}.png`, data: png })),
    );
    return r.body.photos as Array<{ id: string; version: number }>;
  };

  it("a stale version gets 409 with the photo as it is now", async () => {
    const [p] = await newPhotos(1);
    const ok = await as.photographer.patch(url(`/${p.id}`), {
      version: p.version,
      kind: "nameplate",
      caption: "Maker's plate",
    });
    expect(ok.status).toBe(200);
    expect(ok.body.photo).toMatchObject({ kind: "nameplate", caption: "Maker's plate", version: p.version + 1 });
    const stale = await as.curator.patch(url(`/${p.id}`), { version: p.version, caption: "older edit" });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ caption: "Maker's plate", version: p.version + 1 });
  });

  it("the unassigned list holds a new shoot; bulk assignment files each photo to its position in one go", async () => {
    const batch = await newPhotos(2);
    const unassigned = (await as.photographer.get(url("?unassigned=1"))).body.photos.map((p: { id: string }) => p.id);
    expect(unassigned).toEqual(expect.arrayContaining(batch.map((p) => p.id)));
    const r = await as.photographer.post(url("/assign"), {
      items: [
        { photoId: batch[0].id, version: batch[0].version, positionId: board.positions["2-14"].id, kind: "as_found" },
        { photoId: batch[1].id, version: batch[1].version, positionId: board.positions["2-14"].id, kind: "nameplate" },
      ],
    });
    expect(r.status).toBe(200);
    expect(r.body.photos.map((p: { designation: string; boardId: string }) => [p.designation, p.boardId])).toEqual([
      ["2-14", board.boardId],
      ["2-14", board.boardId],
    ]);
    const again = await as.photographer.post(url("/assign"), {
      items: [{ photoId: batch[0].id, version: batch[0].version, positionId: board.positions["1-1"].id }],
    });
    expect(again.status).toBe(409);
  });

  it("the shoot list shows per position the required shots still missing, and follows the curator's settings", async () => {
    const list = async () =>
      (await as.photographer.get(`/api/sites/${fx.siteId}/boards/${board.boardId}/shoot-list`)).body;
    const before = await list();
    expect(before.requiredKinds).toEqual(["as_found", "nameplate"]);
    const by = (d: string, l = before) => l.positions.find((p: { designation: string }) => p.designation === d);
    expect(by("2-14").missing).toEqual([]);
    expect(by("1-1").missing).toEqual(["nameplate"]); // the sideways JPEG was filed as found
    expect(by("1-2").missing).toEqual(["as_found", "nameplate"]); // its photo was deleted
    expect([before.complete, before.total, before.shotsTaken, before.shotsRequired]).toEqual([1, 3, 3, 6]);

    const settings = (await as.viewer.get(`/api/sites/${fx.siteId}/photo-settings`)).body.settings;
    expect(
      (
        await as.photographer.put(`/api/sites/${fx.siteId}/photo-settings`, {
          requiredKinds: ["after_work"],
          version: settings.version,
        })
      ).status,
    ).toBe(403);
    const saved = await as.curator.put(`/api/sites/${fx.siteId}/photo-settings`, {
      requiredKinds: ["after_work", "as_found"],
      version: settings.version,
    });
    expect(saved.body.settings).toEqual({ requiredKinds: ["as_found", "after_work"], version: settings.version + 1 });
    const stale = await as.curator.put(`/api/sites/${fx.siteId}/photo-settings`, {
      requiredKinds: ["thermal"],
      version: settings.version,
    });
    expect(stale.status).toBe(409);
    const after = await list();
    expect(by("2-14", after).missing).toEqual(["after_work"]);
  });
});
