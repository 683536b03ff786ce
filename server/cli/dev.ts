// `npm run dev`: the API in watch mode (tsx) and Vite's dev server with hot reload,
// both against the same local database as `npm start`.
import { spawn } from "node:child_process";
import { join } from "node:path";
import { projectRoot } from "../../db/pg";
import { log, prepareDatabase } from "./prepare";

const { local, db } = await prepareDatabase("dev");
await db.destroy();
const apiPort = process.env.PORT ?? "3000";
// Links in e-mail open the Vite dev server, where the person is working.
const publicUrl = process.env.PUBLIC_URL ?? `http://127.0.0.1:${process.env.VITE_PORT ?? 5173}`;
const env = { ...process.env, DATABASE_URL: local.url, PORT: apiPort, PUBLIC_URL: publicUrl };
const api = spawn(
  process.execPath,
  [join(projectRoot, "node_modules/tsx/dist/cli.mjs"), "watch", "--clear-screen=false", "server/index.ts"],
  {
    cwd: projectRoot,
    stdio: "inherit",
    env,
  },
);
const vite = spawn(join(projectRoot, "node_modules/.bin/vite"), [], { cwd: projectRoot, stdio: "inherit", env });
log(`dev: open http://127.0.0.1:${process.env.VITE_PORT ?? 5173} (API on ${apiPort})`);

let stopping = false;
function stop() {
  if (stopping) return;
  stopping = true;
  api.kill("SIGTERM");
  vite.kill("SIGTERM");
  setTimeout(() => {
    local.stop();
    process.exit(0);
  }, 500);
}
for (const sig of ["SIGINT", "SIGTERM"] as const) process.on(sig, stop);
api.on("exit", stop);
vite.on("exit", stop);
