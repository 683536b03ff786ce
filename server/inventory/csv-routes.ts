/** CSV export (any member) and import (curator; preview writes nothing, commit is all-or-nothing). */
import express, { Router } from "express";
import { importJsonBody, importQuery, siteParams } from "../../src/schemas/inventory";
import type { Db } from "../db";
import { AppError } from "../errors";
import { limitExports } from "../export-stream";
import { requireSiteRole } from "../middleware/roles";
import { actorOf } from "./common";
import { decodeCsvBytes, fromText } from "../csv-read";
import { ImportChanged, ImportInvalid, commitImport } from "./csv-commit";
import { exportInventoryCsv } from "./csv-export";
import { answerOf } from "./csv-import";
import { validateImport } from "./csv-plan-pool";

/**
 * 2 MB of CSV is some 10 000 rows, more than any board set; larger gets 413 (JSON {csv} too: its
 * parser is set in app.ts). The file comes as bytes: its encoding is detected here, not assumed.
 */
const csvBytes = express.raw({
  type: ["text/csv", "text/plain", "application/csv", "text/tab-separated-values", "application/octet-stream"],
  limit: "2mb",
});

export function csvRoutes(db: Db) {
  const r = Router();

  r.get("/sites/:siteId/inventory.csv", requireSiteRole(db, "site.read"), limitExports(db), async (req, res) => {
    const { siteId } = siteParams.parse(req.params);
    await exportInventoryCsv(db, siteId, res);
  });

  r.post("/sites/:siteId/inventory/import", requireSiteRole(db, "inventory.curate"), csvBytes, async (req, res) => {
    const { siteId } = siteParams.parse(req.params);
    const { mode, expect } = importQuery.parse(req.query);
    const decoded = Buffer.isBuffer(req.body)
      ? decodeCsvBytes(req.body)
      : fromText(importJsonBody.parse(req.body ?? {}).csv);
    if (!decoded.text.trim())
      throw new AppError(400, "invalid_input", "The file is empty.", { csv: "The file is empty" });
    if (decoded.text.includes("\u0000"))
      throw new AppError(
        400,
        "invalid_input",
        `The file has NUL characters when read as ${decoded.encoding}: is it a spreadsheet saved as CSV?`,
        {
          csv: "Not a text file",
        },
      );
    if (mode === "preview") return void res.json(answerOf((await validateImport(db, siteId, decoded)).response));
    try {
      res.status(201).json(answerOf(await commitImport(db, siteId, actorOf(res), decoded, expect)));
    } catch (e) {
      if (e instanceof ImportInvalid) {
        const { rows, summary } = answerOf(e.result);
        return void res
          .status(400)
          .json({ error: { code: e.code, message: e.message, fields: e.fields, rows, summary } });
      }
      if (e instanceof ImportChanged) {
        const { rows, summary } = answerOf(e.result);
        return void res.status(409).json({ error: { code: e.code, message: e.message, rows, summary } });
      }
      throw e;
    }
  });
  return r;
}
