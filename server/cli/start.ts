// `npm start`: set everything up, then serve the API and the built client on one port.
// Production mode: Express (and its final handler) never prints a stack into a page.
process.env.NODE_ENV ??= "production";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "../seed/people";
import { serve, stopOnSignals } from "../index";
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
const running = await serve({ db, port, clientDir });

log(`ready in ${((Date.now() - started) / 1000).toFixed(1)} s — open http://127.0.0.1:${port}`);
log(`demo accounts (password "${DEMO_PASSWORD}"): ${DEMO_PEOPLE.map((p) => p.email).join(", ")}`);
log("Ctrl-C stops the server and the database; data is kept in .data/");

log(
  running.jobs.working
    ? "background jobs run in this process (TIDELINE_WORKER=off to leave them to `npm run worker`)"
    : "TIDELINE_WORKER=off: no background jobs here; run `npm run worker`",
);
stopOnSignals(running, async () => {
  await db.destroy();
  local.stop();
});
