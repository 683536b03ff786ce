// Runs as npm's postinstall: records which package-lock.json node_modules was installed from, so that
// `npm start`/`npm test`/`npm run bench` (db/bootstrap.mjs) do not run `npm ci` again after a plain `npm ci`.
import { createHash } from "node:crypto";
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const lock = join(root, "package-lock.json");
const hash = createHash("sha256")
  .update(readFileSync(existsSync(lock) ? lock : join(root, "package.json")))
  .digest("hex");
if (existsSync(join(root, "node_modules"))) {
  writeFileSync(join(root, "node_modules", ".tideline-lock-hash"), hash + "\n");
}
