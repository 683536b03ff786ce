/**
 * The wanted list of the invented MV Kestrel Lantern: demand from the register (whatever
 * the inventory step set to replace or source), plus hand-added spares, a few leads and
 * acquisitions. Every source, contact and price is made up.
 */
import type { Kysely } from "kysely";
import type { Database } from "../../db/types";
import { rebuildBudget, reconcileDemand } from "../parts/service";
import { needKey } from "../../src/domain/part-workflow";
import type { SeedContext } from "./context";

type Db = Kysely<Database>;

const LEADS = [
  {
    sourceKind: "donor",
    source: "Laid-up sister tender 'Gannet Reach' (fictional), Saltmarrow Basin",
    contact: "Her trust's engineer, via the basin office",
    askingPrice: 0,
    notes: "May swap for our spare ground lamps.",
  },
  {
    sourceKind: "dealer",
    source: "Copperline Switchgear Salvage (fictional)",
    contact: "counter@copperline.example",
    askingPrice: 185,
    notes: "Has two of the frame; unknown condition.",
  },
  {
    sourceKind: "collector",
    source: "A collector of marine switchgear in Wendle Cove (fictional)",
    contact: "by letter only",
    askingPrice: 240,
    notes: "",
  },
  {
    sourceKind: "salvage",
    source: "Breakers' yard at Hollin Point (fictional)",
    contact: "yard foreman, weekday mornings",
    askingPrice: 60,
    notes: "Bring own tools.",
  },
] as const;

export async function seedParts(trx: Db, ctx: SeedContext) {
  const scrounger = ctx.people["scrounger@tideline.test"];
  const curator = ctx.people["curator@tideline.test"];
  await reconcileDemand(trx, ctx.siteId, curator);
  const lines = await trx
    .selectFrom("partLines")
    .select(["id", "kind"])
    .where("siteId", "=", ctx.siteId)
    .where("status", "=", "wanted")
    .orderBy("createdAt")
    .execute();

  // Hand-added: spares and consumables no position asks for.
  const lamps = await trx
    .insertInto("partLines")
    .values({
      siteId: ctx.siteId,
      origin: "manual",
      kind: "ground_lamp",
      voltageRating: 250,
      need: "spare clear lamps, bayonet cap",
      specKey: needKey({ kind: "ground_lamp", voltageRating: 250 }, "spare clear lamps, bayonet cap"),
      manualQty: 6,
      estimatedUnitCost: 4.5,
      heritageRule: "modern_ok",
      notes: "Keep six on the shelf for the ground-detection lamps.",
      createdBy: scrounger,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  await trx
    .insertInto("partLineHistory")
    .values({
      siteId: ctx.siteId,
      lineId: lamps.id,
      action: "created",
      summary: "Added by hand (6 wanted)",
      toStatus: "wanted",
      actorId: scrounger,
    })
    .execute();

  for (const [i, line] of lines.slice(0, 4).entries()) {
    const lead = LEADS[i];
    const row = await trx
      .insertInto("partLeads")
      .values({
        siteId: ctx.siteId,
        lineId: line.id,
        ...lead,
        createdBy: scrounger,
        status: i === 1 ? "secured" : "open",
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    const status = i === 1 ? "acquired" : "lead_found";
    await trx
      .updateTable("partLines")
      .set({ status, estimatedUnitCost: [120, 185, 240, 60][i], heritageRule: i === 2 ? "period_ok" : "original_only" })
      .where("id", "=", line.id)
      .execute();
    await trx
      .insertInto("partLineHistory")
      .values([
        {
          siteId: ctx.siteId,
          lineId: line.id,
          action: "lead_added",
          summary: `Lead recorded: ${lead.source}`,
          actorId: scrounger,
        },
        {
          siteId: ctx.siteId,
          lineId: line.id,
          action: "status",
          summary: "A lead was recorded",
          fromStatus: "wanted",
          toStatus: "lead_found",
          actorId: scrounger,
        },
      ])
      .execute();
    if (i === 1) {
      await trx
        .insertInto("partAcquisitions")
        .values({
          siteId: ctx.siteId,
          lineId: line.id,
          leadId: row.id,
          qty: 1,
          cost: 170,
          acquiredOn: "2026-11-18",
          notes: "Haggled down; collected by van.",
          recordedBy: scrounger,
        })
        .execute();
      await trx
        .insertInto("partLineHistory")
        .values({
          siteId: ctx.siteId,
          lineId: line.id,
          action: "status",
          summary: "Bought from the dealer",
          fromStatus: "lead_found",
          toStatus: "acquired",
          actorId: scrounger,
        })
        .execute();
    }
  }
  // The lines, leads and purchases above were written directly: count the kept budget from them.
  await rebuildBudget(trx, ctx.siteId);
}
