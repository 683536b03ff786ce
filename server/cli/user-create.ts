// `npm run user:create -- --email a@b.c [--name "A B"] [--admin]`; the password comes
// from TIDELINE_PASSWORD or is asked for on the terminal (not echoed).
import { parseArgs } from "node:util";
import { createInterface } from "node:readline";
import { createUserBody } from "../../src/schemas/sites";
import { createUser } from "../sites/service";
import { prepareDatabase } from "./prepare";

const { values } = parseArgs({
  options: { email: { type: "string" }, name: { type: "string" }, admin: { type: "boolean", default: false } },
});
if (!values.email) {
  console.error('usage: npm run user:create -- --email you@example.org [--name "Your Name"] [--admin]');
  process.exit(2);
}

function askHidden(question: string): Promise<string> {
  return new Promise((resolve) => {
    const rl = createInterface({ input: process.stdin, output: process.stdout, terminal: true });
    const out = rl as unknown as { _writeToOutput: (s: string) => void; output: NodeJS.WriteStream };
    let asked = false;
    out._writeToOutput = (s: string) => {
      if (!asked) {
        process.stdout.write(s);
        asked = true;
      }
    };
    rl.question(question, (answer) => {
      rl.close();
      process.stdout.write("\n");
      resolve(answer);
    });
  });
}

const password = process.env.TIDELINE_PASSWORD ?? (await askHidden("Password (at least 10 characters): "));
const input = createUserBody.safeParse({
  email: values.email,
  name: values.name ?? values.email,
  password,
  isAdmin: values.admin,
});
if (!input.success) {
  console.error(input.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("\n"));
  process.exit(2);
}
const { local, db } = await prepareDatabase("dev", undefined, { seed: false });
try {
  const user = await createUser(db, input.data, null);
  console.log(`[tideline] created ${user.email}${user.isAdmin ? " (instance admin)" : ""}`);
} catch (e) {
  console.error(`[tideline] ${e instanceof Error ? e.message : e}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
  local.stop();
}
