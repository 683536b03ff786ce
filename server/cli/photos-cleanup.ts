// `npm run photos:cleanup [-- --purge] [-- --delete-orphans]`: reports photo files
// without rows and rows without files; --purge removes photos soft-deleted more than
// 30 days ago; --delete-orphans removes the files no row points at.
import { deleteOrphanFiles, findOrphans, KEEP_DELETED_DAYS, purgeDeleted } from "../photos/cleanup";
import { storageFromEnv } from "../photos/storage";
import { log, prepareDatabase } from "./prepare";

const args = new Set(process.argv.slice(2));
const { local, db } = await prepareDatabase("dev", undefined, { seed: false });
const storage = storageFromEnv();
try {
  if (args.has("--purge")) {
    const purged = await purgeDeleted(db, storage, new Date());
    log(`purged ${purged.length} photo(s) deleted more than ${KEEP_DELETED_DAYS} days ago`);
  }
  const r = await findOrphans(db, storage);
  log(`photo storage (${storage.kind}): ${r.storedKeys} file(s); photo rows: ${r.rows}`);
  log(`files without a row: ${r.filesWithoutRows.length}`);
  for (const k of r.filesWithoutRows) log(`  ${k}`);
  log(`rows with missing files: ${r.rowsWithoutFiles.length}`);
  for (const x of r.rowsWithoutFiles) log(`  photo ${x.photoId}: ${x.missing.join(", ")}`);
  if (args.has("--delete-orphans") && r.filesWithoutRows.length) {
    await deleteOrphanFiles(storage, r.filesWithoutRows);
    log(`deleted ${r.filesWithoutRows.length} orphan file(s)`);
  }
  process.exitCode = r.rowsWithoutFiles.length ? 1 : 0;
} finally {
  await db.destroy();
  local.stop();
}
