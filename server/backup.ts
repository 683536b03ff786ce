/**
 * One archive for everything a crew would lose with the machine: the database (pg_dump's
 * custom format, from Debian's PostgreSQL of the same version as the server) and every
 * stored photo (local disk or S3, read through the same PhotoStorage interface the app
 * uses), packed with the npm `tar` package (gzip) with a manifest of SHA-256 sums.
 *
 *   tideline-backup-<when>.tar.gz
 *     manifest.json      format, version, when, database, photo keys with size and sha256
 *     database.dump      pg_dump --format=custom --no-owner --no-acl
 *     photos/<key>       each stored object, byte for byte
 *
 * Restore replaces the database's contents (pg_restore --clean --if-exists, in one
 * transaction) and makes the photo store hold exactly the archive's photos.
 */
import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { createWriteStream } from "node:fs";
import { mkdir, mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { pipeline } from "node:stream/promises";
import * as tar from "tar";
import { pgBin } from "../db/pg";
import type { PhotoStorage } from "./photos/storage";

export const BACKUP_FORMAT = "tideline-backup";
export const BACKUP_VERSION = 1;

interface Manifest {
  format: typeof BACKUP_FORMAT;
  version: number;
  createdAt: string;
  database: string;
  photoStorage: "disk" | "s3";
  photos: Array<{ key: string; bytes: number; sha256: string }>;
}

/** The URL without its password, which goes to the client tools through PGPASSWORD instead of the process list. */
function pgConnection(url: string) {
  const u = new URL(url);
  const password = decodeURIComponent(u.password);
  u.password = "";
  return {
    dbname: u.toString(),
    env: { ...process.env, ...(password ? { PGPASSWORD: password } : {}) },
    database: decodeURIComponent(u.pathname.slice(1)),
  };
}

function runTool(tool: string, args: string[], env: NodeJS.ProcessEnv) {
  const r = spawnSync(join(pgBin(), tool), args, { env, encoding: "utf8", cwd: "/" });
  if (r.error) throw r.error;
  if (r.status !== 0) throw new Error(`${tool} failed (exit ${r.status}): ${(r.stderr || r.stdout).trim()}`);
}

const MEDIA: Record<string, string> = {
  jpg: "image/jpeg",
  jpeg: "image/jpeg",
  png: "image/png",
  webp: "image/webp",
  tif: "image/tiff",
  tiff: "image/tiff",
  heic: "image/heic",
  heif: "image/heif",
};
const contentTypeOf = (key: string) => MEDIA[key.split(".").pop()?.toLowerCase() ?? ""] ?? "application/octet-stream";
const photoKeys = async (storage: PhotoStorage) => (await storage.listKeys()).filter((k) => !k.endsWith(".partial"));

export async function backup(opts: {
  databaseUrl: string;
  storage: PhotoStorage;
  out: string;
}): Promise<{ file: string; photos: number }> {
  const work = await mkdtemp(join(tmpdir(), "tideline-backup-"));
  try {
    const conn = pgConnection(opts.databaseUrl);
    runTool(
      "pg_dump",
      ["--format=custom", "--no-owner", "--no-acl", `--file=${join(work, "database.dump")}`, `--dbname=${conn.dbname}`],
      conn.env,
    );
    const manifest: Manifest = {
      format: BACKUP_FORMAT,
      version: BACKUP_VERSION,
      createdAt: new Date().toISOString(),
      database: conn.database,
      photoStorage: opts.storage.kind,
      photos: [],
    };
    for (const key of await photoKeys(opts.storage)) {
      const dest = join(work, "photos", key);
      await mkdir(dirname(dest), { recursive: true });
      const hash = createHash("sha256");
      let bytes = 0;
      const source = await opts.storage.get(key);
      source.on("data", (c: Buffer) => {
        hash.update(c);
        bytes += c.length;
      });
      await pipeline(source, createWriteStream(dest));
      manifest.photos.push({ key, bytes, sha256: hash.digest("hex") });
    }
    await writeFile(join(work, "manifest.json"), JSON.stringify(manifest, null, 2));
    await mkdir(dirname(opts.out), { recursive: true });
    const entries = ["manifest.json", "database.dump", ...(manifest.photos.length ? ["photos"] : [])];
    await tar.create({ gzip: true, file: opts.out, cwd: work, portable: true }, entries);
    return { file: opts.out, photos: manifest.photos.length };
  } finally {
    await rm(work, { recursive: true, force: true });
  }
}

export async function restore(opts: {
  databaseUrl: string;
  storage: PhotoStorage;
  file: string;
}): Promise<{ photos: number; removed: number }> {
  const work = await mkdtemp(join(tmpdir(), "tideline-restore-"));
  try {
    await tar.extract({ file: opts.file, cwd: work, strict: true });
    const manifest = JSON.parse(await readFile(join(work, "manifest.json"), "utf8")) as Manifest;
    if (manifest.format !== BACKUP_FORMAT || manifest.version > BACKUP_VERSION)
      throw new Error(`${opts.file} is not a Tideline backup this version can read`);
    // Check every photo before touching anything: a damaged archive changes nothing.
    const photos: Array<{ key: string; body: Buffer }> = [];
    for (const p of manifest.photos) {
      const body = await readFile(join(work, "photos", p.key));
      if (createHash("sha256").update(body).digest("hex") !== p.sha256)
        throw new Error(`photo ${p.key} in the archive is damaged (checksum differs)`);
      photos.push({ key: p.key, body });
    }
    const conn = pgConnection(opts.databaseUrl);
    runTool(
      "pg_restore",
      [
        "--clean",
        "--if-exists",
        "--no-owner",
        "--no-acl",
        "--single-transaction",
        "--exit-on-error",
        `--dbname=${conn.dbname}`,
        join(work, "database.dump"),
      ],
      conn.env,
    );
    const keep = new Set(manifest.photos.map((p) => p.key));
    let removed = 0;
    for (const key of await photoKeys(opts.storage)) {
      if (keep.has(key)) continue;
      await opts.storage.delete(key);
      removed++;
    }
    for (const p of photos) await opts.storage.put(p.key, p.body, contentTypeOf(p.key));
    return { photos: photos.length, removed };
  } finally {
    await rm(work, { recursive: true, force: true });
  }
}
