/** The inventory and condition survey API, contract in src/schemas/inventory.ts. */
import { Router } from "express";
import type { Db } from "../db";
import { boardRoutes } from "./boards-routes";
import { csvRoutes } from "./csv-routes";
import { positionRoutes } from "./positions-routes";
import { surveyRoutes } from "./survey-routes";

export function inventoryRoutes(db: Db) {
  const r = Router();
  r.use(boardRoutes(db));
  r.use(positionRoutes(db));
  r.use(surveyRoutes(db));
  r.use(csvRoutes(db));
  return r;
}
