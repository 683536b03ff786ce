import { FLAGS, SORT_KEYS, type Flag, type SortKey } from "../../schemas/defects";
import {
  DEFECT_CATEGORIES,
  DEFECT_SEVERITIES,
  DEFECT_STATUSES,
  type DefectCategory,
  type DefectSeverity,
  type DefectStatus,
} from "../../domain/vocab";

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
const pick = <T extends string>(all: readonly T[], v: string[]) =>
  v.filter((x): x is T => (all as readonly string[]).includes(x));

export function readState(p: URLSearchParams): RegisterState {
  const sort = p.get("sort") as SortKey | null;
  const page = Number(p.get("page") ?? 0);
  const size = Number(p.get("size") ?? 25);
  return {
    q: p.get("q") ?? "",
    board: p.getAll("board"),
    category: pick(DEFECT_CATEGORIES, p.getAll("category")),
    severity: pick(DEFECT_SEVERITIES, p.getAll("severity")),
    status: pick(DEFECT_STATUSES, p.getAll("status")),
    assignee: p.getAll("assignee"),
    flag: pick(FLAGS, p.getAll("flag")),
    sort: sort && SORT_KEYS.includes(sort) ? sort : "priority",
    dir: p.get("dir") === "asc" ? "asc" : "desc",
    page: Number.isInteger(page) && page >= 0 ? page : 0,
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
export const localToday = () => {
  const d = new Date();
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, "0")}-${String(d.getDate()).padStart(2, "0")}`;
};
