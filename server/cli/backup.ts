// `npm run backup [-- FILE]`: the database and the photo store in one archive
// (default .data/backups/tideline-backup-<UTC time>.tar.gz). See server/backup.ts.
import { join, resolve } from "node:path";
import { openLocalDatabase } from "../../db/local";
import { projectRoot } from "../../db/pg";
import { backup } from "../backup";
import { storageFromEnv } from "../photos/storage";

const stamp = new Date()
  .toISOString()
  .replace(/[-:]/g, "")
  .replace(/\.\d+Z$/, "Z");
const out = resolve(process.argv[2] ?? join(projectRoot, ".data", "backups", `tideline-backup-${stamp}.tar.gz`));
const local = await openLocalDatabase("dev");
try {
  const storage = storageFromEnv();
  const r = await backup({ databaseUrl: local.url, storage, out });
  console.log(
    `[tideline] backup written: ${r.file} (database and ${r.photos} photo files from ${storage.kind} storage)`,
  );
} finally {
  local.stop();
}
