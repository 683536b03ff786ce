import { sql, type Selectable } from "kysely";
import type { ComponentsTable } from "../../db/types";

/**
 * A position's current component (at most one: components_current_uq), for a lateral join on `positions as p`:
 * `.leftJoinLateral(() => currentComponentOfP(["c.id", …]), (j) => j.onTrue())`. It is read by key, once
 * per position. Joined as a table instead (`leftJoin("components as c", …)`), the planner hashed every component
 * of the site to answer one board: a read of one board grew with the site (DEVELOPERS.md "One board's page, the
 * rest measured", "Per-board reads by key"). A read-only fragment shared by the domains that read a board's
 * positions, built here and run by the caller's repository (eslint: only repositories run queries). It lives
 * with the inventory domain, which owns components and stays their only writer; it is not named a repository
 * because other domains import it (tests/lint/table-owners.test.ts).
 */
export const currentComponentOfP = <C extends keyof ComponentsTable & string>(columns: readonly `c.${C}`[]) =>
  sql<Pick<Selectable<ComponentsTable>, C>>`(select ${sql.join(columns.map((c) => sql.ref(c)))}
    from components as c where c.position_id = p.id and c.retired_at is null limit 1)`.as("c");
