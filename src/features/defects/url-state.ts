import type { z } from "zod";
import { localDay } from "../../lib/clock";
import { listQuery, type Flag, type SortKey } from "../../schemas/defects";
import type { DefectCategory, DefectSeverity, DefectStatus } from "../../domain/vocab";

/** Everything that makes a register view; it lives in the URL so a link shows the same view. */
export interface RegisterState {
  q: string;
  board: string[];
  category: DefectCategory[];
  severity: DefectSeverity[];
  status: DefectStatus[];
  assignee: string[];
  flag: Flag[];
  sort: SortKey;
  dir: "asc" | "desc";
  page: number;
  size: number;
  /** hidden column ids */
  hide: string[];
  /** column order (ids); empty = default */
  cols: string[];
}

export const PAGE_SIZES = [25, 50, 100] as const;
export const DEFAULT_HIDDEN = ["createdAt", "costEstimate", "updatedAt"];
type ListKey = "board" | "category" | "severity" | "status" | "assignee" | "flag";
const shape = listQuery.shape;

/**
 * The URL's view, read with the server's own schema (`listQuery` in src/schemas/defects.ts) key by key:
 * a value the server would refuse (a hand-edited link, an old bookmark) falls back to that key's default
 * instead of emptying the register; in a list, each value is checked on its own.
 */
export function readState(p: URLSearchParams): RegisterState {
  const one = <K extends Exclude<keyof typeof shape, ListKey>>(k: K) => {
    const r = shape[k].safeParse(p.get(k) ?? undefined);
    return (r.success ? r.data : shape[k].parse(undefined)) as z.output<(typeof shape)[K]>;
  };
  const list = <K extends ListKey>(k: K) =>
    p
      .getAll(k)
      .flatMap((v) => v.split(","))
      .filter((v) => shape[k].safeParse(v).success) as z.output<(typeof shape)[K]>;
  const size = one("size");
  const q = p.get("q") ?? "";
  return {
    // Checked, but kept as typed (the server trims): the search box follows the URL while someone types.
    q: shape.q.safeParse(q).success ? q : "",
    board: list("board"),
    category: list("category"),
    severity: list("severity"),
    status: list("status"),
    assignee: list("assignee"),
    flag: list("flag"),
    sort: one("sort"),
    dir: one("dir"),
    page: one("page"),
    size: (PAGE_SIZES as readonly number[]).includes(size) ? size : 25,
    hide: p.has("hide") ? p.get("hide")!.split(",").filter(Boolean) : DEFAULT_HIDDEN,
    cols: (p.get("cols") ?? "").split(",").filter(Boolean),
  };
}

/** URL query for a state; defaults are left out so links stay short. */
export function writeState(s: RegisterState): string {
  const p = new URLSearchParams();
  if (s.q) p.set("q", s.q);
  for (const k of ["board", "category", "severity", "status", "assignee", "flag"] as const)
    for (const v of s[k]) p.append(k, v);
  if (s.sort !== "priority") p.set("sort", s.sort);
  if (s.dir !== "desc") p.set("dir", s.dir);
  if (s.page) p.set("page", String(s.page));
  if (s.size !== 25) p.set("size", String(s.size));
  if (s.hide.join(",") !== DEFAULT_HIDDEN.join(",")) p.set("hide", s.hide.join(","));
  if (s.cols.length) p.set("cols", s.cols.join(","));
  return p.toString();
}

/** The API query for the server: filters, sort and page only (not the column layout). */
export function apiQuery(s: RegisterState, today: string): string {
  const p = new URLSearchParams(writeState({ ...s, hide: DEFAULT_HIDDEN, cols: [] }));
  p.set("today", today);
  return p.toString();
}

/** Today's date in the browser's own time zone, YYYY-MM-DD. */
export const localToday = () => localDay(new Date());
