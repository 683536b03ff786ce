// `npm start`: set everything up, then serve the API and the built client on one port.
// Production mode: Express (and its final handler) never prints a stack into a page.
process.env.NODE_ENV ??= "production";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "../../db/seed/people";
import { serve } from "../index";
import { buildClient, log, prepareDatabase } from "./prepare";

const started = Date.now();
const { local, db } = await prepareDatabase("dev");
let clientDir: string;
try {
  clientDir = buildClient();
} catch (e) {
  await db.destroy();
  local.stop();
  throw e;
}
const port = Number(process.env.PORT ?? 3000);
const server = await serve({ db, port, clientDir });

log(`ready in ${((Date.now() - started) / 1000).toFixed(1)} s — open http://127.0.0.1:${port}`);
log(`demo accounts (password "${DEMO_PASSWORD}"): ${DEMO_PEOPLE.map((p) => p.email).join(", ")}`);
log("Ctrl-C stops the server and the database; data is kept in .data/");

let stopping = false;
async function stop() {
  if (stopping) return;
  stopping = true;
  log("stopping…");
  server.closeAllConnections?.();
  await new Promise((r) => server.close(r));
  await db.destroy();
  local.stop();
  log("stopped.");
  process.exit(0);
}
process.on("SIGINT", stop);
process.on("SIGTERM", stop);
process.on("SIGHUP", stop);
