/** CSV export (any member) and import (curator; preview writes nothing, commit is all-or-nothing). */
import express, { Router } from "express";
import { importJsonBody, importQuery, siteParams } from "../../src/schemas/inventory";
import type { Db } from "../db";
import { AppError } from "../errors";
import { limitExports } from "../export-stream";
import { requireSiteRole } from "../middleware/roles";
import { actorOf } from "./common";
import { ImportInvalid, commitImport } from "./csv-commit";
import { streamInventoryCsv } from "./csv-export";
import { validateImport } from "./csv-import";

/** 2 MB of CSV is some 10 000 rows, more than any board set; larger gets 413 (JSON {csv} too: its parser is set in app.ts). */
const csvText = express.text({ type: ["text/csv", "text/plain", "application/csv"], limit: "2mb" });

const slug = (s: string) =>
  s
    .toLowerCase()
    .normalize("NFKD")
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-|-$/g, "") || "site";

export function csvRoutes(db: Db) {
  const r = Router();

  r.get("/sites/:siteId/inventory.csv", requireSiteRole(db), limitExports(db), async (req, res) => {
    const { siteId } = siteParams.parse(req.params);
    const site = await db.selectFrom("sites").select("name").where("id", "=", siteId).executeTakeFirstOrThrow();
    const day = new Date().toISOString().slice(0, 10);
    await streamInventoryCsv(db, siteId, `${slug(site.name)}-inventory-${day}.csv`, res);
  });

  r.post("/sites/:siteId/inventory/import", requireSiteRole(db, "curator"), csvText, async (req, res) => {
    const { siteId } = siteParams.parse(req.params);
    const { mode } = importQuery.parse(req.query);
    const text = typeof req.body === "string" ? req.body : importJsonBody.parse(req.body ?? {}).csv;
    if (!text.trim()) throw new AppError(400, "invalid_input", "The file is empty.", { csv: "The file is empty" });
    if (mode === "preview") return void res.json((await validateImport(db, siteId, text)).response);
    try {
      res.status(201).json(await commitImport(db, siteId, actorOf(res), text));
    } catch (e) {
      if (!(e instanceof ImportInvalid)) throw e;
      res.status(400).json({
        error: { code: e.code, message: e.message, fields: e.fields, rows: e.result.rows, summary: e.result.summary },
      });
    }
  });
  return r;
}
