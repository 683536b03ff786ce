// `npm run restore -- FILE`: puts back what `npm run backup` saved, replacing the current
// database contents and photo store. Stop the server first.
import { existsSync } from "node:fs";
import { resolve } from "node:path";
import { openLocalDatabase } from "../../db/local";
import { restore } from "../backup";
import { storageFromEnv } from "../photos/storage";

const file = process.argv[2];
if (!file || !existsSync(resolve(file))) {
  console.error("Usage: npm run restore -- FILE   (a .tar.gz written by `npm run backup`)");
  process.exit(2);
}
console.log(
  "[tideline] restoring: this replaces the database and the photo store with the archive's; stop the server first.",
);
const local = await openLocalDatabase("dev");
try {
  const r = await restore({ databaseUrl: local.url, storage: storageFromEnv(), file: resolve(file) });
  console.log(
    `[tideline] restored the database and ${r.photos} photo files (${r.removed} files not in the archive removed) from ${file}`,
  );
} finally {
  local.stop();
}
