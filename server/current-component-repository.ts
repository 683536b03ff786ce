import { sql } from "kysely";
import type { ComponentsTable } from "../db/types";
import type { Db } from "./db";

/**
 * A position's current component (at most one: components_current_uq), for a lateral join on `positions as p`:
 * `.leftJoinLateral(() => currentComponentOfP(db, ["c.id", …]), (j) => j.onTrue())`. It is read by key, once
 * per position. Joined as a table instead (`leftJoin("components as c", …)`), the planner hashed every component
 * of the site to answer one board: a read of one board grew with the site (DEVELOPERS.md "One board's page, the
 * rest measured", "Per-board reads by key"). A read-only fragment shared by the domains that read a board's
 * positions; the inventory domain stays the only writer of components.
 */
export const currentComponentOfP = <C extends `c.${keyof ComponentsTable & string}`>(db: Db, columns: readonly C[]) =>
  db
    .selectFrom("components as c")
    .select(columns)
    .where("c.positionId", "=", sql.ref<string>("p.id"))
    .where("c.retiredAt", "is", null)
    .limit(1)
    .as("c");
