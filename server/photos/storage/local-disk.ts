import { createReadStream } from "node:fs";
import {
  access,
  constants,
  copyFile,
  link,
  mkdir,
  readdir,
  readFile,
  rename,
  rm,
  rmdir,
  stat,
  writeFile,
} from "node:fs/promises";
import { dirname, join, relative, resolve, sep } from "node:path";
import type { Readable } from "node:stream";
import { processAlive } from "../../process-alive";
import { StorageNotFound, type PhotoStorage } from "./contract";

/** Photos as files under one folder (the embedded default: .data/photos). */
export class LocalDiskStorage implements PhotoStorage {
  readonly kind = "disk" as const;
  readonly root: string;
  constructor(root: string) {
    this.root = resolve(root);
  }

  /** Keys are ours, but refuse anything that would leave the root all the same. */
  private path(key: string) {
    const p = resolve(this.root, key);
    if (!p.startsWith(this.root + sep)) throw new Error(`Key escapes the photo folder: ${key}`);
    return p;
  }

  async put(key: string, body: Buffer, _contentType?: string) {
    const p = this.path(key);
    // Write beside, then rename: a reader never sees half a file. The folder is made only when
    // missing (a rendition's folder already holds its original: one file-system call fewer).
    const tmp = `${p}.${process.pid}.partial`;
    await writeFile(tmp, body).catch(async (e: NodeJS.ErrnoException) => {
      if (e.code !== "ENOENT") throw e;
      await mkdir(dirname(p), { recursive: true });
      await writeFile(tmp, body);
    });
    await rename(tmp, p);
  }

  async putFile(key: string, path: string, _contentType?: string) {
    const p = this.path(key);
    await mkdir(dirname(p), { recursive: true });
    const tmp = `${p}.${process.pid}.partial`;
    // A second name for the same bytes when both folders share a file system (no copy: the source
    // is a finished temporary file its owner only deletes); a copy across file systems.
    await rm(tmp, { force: true });
    await link(path, tmp).catch(async (e: NodeJS.ErrnoException) => {
      if (e.code !== "EXDEV" && e.code !== "EPERM" && e.code !== "ENOTSUP") throw e;
      await copyFile(path, tmp);
    });
    await rename(tmp, p);
  }

  async check() {
    await mkdir(this.root, { recursive: true });
    await access(this.root, constants.W_OK);
  }

  async get(key: string): Promise<Readable> {
    const p = this.path(key);
    try {
      if (!(await stat(p)).isFile()) throw new StorageNotFound(key);
    } catch {
      throw new StorageNotFound(key);
    }
    return createReadStream(p);
  }

  async decodeSource(key: string): Promise<string> {
    return this.path(key);
  }

  async getBytes(key: string): Promise<Buffer> {
    try {
      return await readFile(this.path(key));
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === "ENOENT" || (e as NodeJS.ErrnoException).code === "EISDIR")
        throw new StorageNotFound(key);
      throw e;
    }
  }

  async delete(key: string) {
    await rm(this.path(key), { force: true });
    // Leave no empty photo folders behind; ignore a folder that still holds files.
    await rmdir(dirname(this.path(key))).catch(() => undefined);
  }

  /**
   * Removes what an interrupted write left: `<key>.<pid>.partial` files whose writer is no
   * longer running (a crash between write and rename can leave them, zero bytes or half a
   * photo). Called once at start, before any upload of this process. Returns what it removed.
   */
  async removeLeftovers(): Promise<string[]> {
    const removed: string[] = [];
    for (const key of await this.listKeys()) {
      const m = /\.(\d+)\.partial$/.exec(key);
      if (!m) continue;
      const pid = Number(m[1]);
      if (pid !== process.pid && processAlive(pid)) continue; // another process is writing it now
      await rm(this.path(key), { force: true });
      removed.push(key);
    }
    return removed;
  }

  async listKeys(prefix = "") {
    const out: string[] = [];
    const walk = async (dir: string) => {
      let names: string[];
      try {
        names = await readdir(dir);
      } catch {
        return;
      }
      for (const n of names) {
        const p = join(dir, n);
        if ((await stat(p)).isDirectory()) await walk(p);
        else out.push(relative(this.root, p).split(sep).join("/"));
      }
    };
    await walk(this.root);
    return out.filter((k) => k.startsWith(prefix)).sort();
  }
}
