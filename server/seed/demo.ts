import type { Kysely } from "kysely";
import type { Database } from "../../db/types";
import { seedParts } from "./parts";
import { hashPassword } from "../auth/password";
import { DEMO_PASSWORD, DEMO_PEOPLE, DEMO_SITE } from "./people";
import { seedDefects } from "./defects";
import { seedInventory } from "./inventory";
import { seedInvitations } from "./invitations";
import { seedPhotos } from "./photos";
import { seedReadings } from "./readings";
import { seedReturnToService } from "./return-to-service";
import { refreshSiteSummaries } from "../inventory/board-summaries-repository";
import type { SeedContext } from "./context";

type Db = Kysely<Database>;

/** True when nobody has an account yet: the only time the demo is loaded. */
export async function isEmpty(db: Db) {
  const row = await db
    .selectFrom("users")
    .select((eb) => eb.fn.countAll<number>().as("n"))
    .executeTakeFirstOrThrow();
  return Number(row.n) === 0;
}

/** Loads the demo scenario: the site, its people, and what later seed steps add. */
export async function seedDemo(db: Db) {
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  await db.transaction().execute(async (trx) => {
    const site = await trx.insertInto("sites").values(DEMO_SITE).returning("id").executeTakeFirstOrThrow();
    const people: Record<string, string> = {};
    for (const p of DEMO_PEOPLE) {
      const u = await trx
        .insertInto("users")
        .values({ email: p.email, name: p.name, passwordHash, isAdmin: p.isAdmin })
        .returning("id")
        .executeTakeFirstOrThrow();
      people[p.email] = u.id;
      if (p.role) await trx.insertInto("memberships").values({ siteId: site.id, userId: u.id, role: p.role }).execute();
    }
    for (const step of SEED_STEPS) await step(trx, { siteId: site.id, people });
  });
}

/** Later features append their part of the scenario here, in order. */
export const SEED_STEPS: Array<(trx: Db, ctx: SeedContext) => Promise<void>> = [
  seedInventory, // boards, positions, components and the survey: first, others hang on it
  seedInvitations,
  (trx, ctx) => seedPhotos(trx, ctx), // a few labelled drawings filed to positions (after the inventory)
  seedDefects, // the defect register, raised from the inventory's inspections
  seedReadings, // test readings on the main board: after the inventory
  seedParts, // the wanted list: demand from the register, leads and acquisitions
  (trx, ctx) => seedReturnToService(trx, ctx), // the main board's staged return to service, relative to today: after defects and readings
  (trx, ctx) => refreshSiteSummaries(trx, ctx.siteId), // the overview's per-board counts, as the services keep them: last
];
