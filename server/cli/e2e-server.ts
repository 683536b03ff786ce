// The server Playwright starts: a fresh e2e database with the demo scenario, the built
// client, on E2E_PORT. Stopped by Playwright at the end of the run.
import { buildClient, log, prepareDatabase } from "./prepare";
import { ensureDatabase } from "../../db/pg";
import { openLocalDatabase } from "../../db/local";
import { serve, stopOnSignals } from "../index";
import { rmSync } from "node:fs";
import { join } from "node:path";
import { projectRoot } from "../../db/pg";

// Background jobs (e-mail, photo renditions) are picked up quickly in browser tests.
process.env.TIDELINE_JOB_POLL_SECONDS ??= "0.5";
const name = process.env.E2E_DATABASE ?? "tideline_e2e";
// The e2e database is fresh each run; so is its photo folder, apart from the dev one.
process.env.PHOTO_DIR ??= join(projectRoot, ".data", "photos-e2e");
rmSync(process.env.PHOTO_DIR, { recursive: true, force: true });
const cluster = await openLocalDatabase("test", "postgres");
await ensureDatabase(cluster.adminUrl, name, { fresh: true, owner: cluster.appRole });
const { local, db } = await prepareDatabase("test", name);
const clientDir = buildClient();
const port = Number(process.env.PORT ?? 3100);
const running = await serve({ db, port, clientDir });
log(`e2e server on http://127.0.0.1:${port} (database ${name})`);
stopOnSignals(running, async () => {
  await db.destroy();
  local.stop();
  cluster.stop();
});
