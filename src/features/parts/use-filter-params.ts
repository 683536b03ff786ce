import { useSearchParams } from "react-router";
import { listQuery, type ListQuery } from "../../schemas/parts";

/** The view a URL's query names; an unreadable one falls back to the default (the lines still open). */
const parse = (params: URLSearchParams): ListQuery => {
  const parsed = listQuery.safeParse(Object.fromEntries(params));
  return parsed.success ? parsed.data : { status: "open" as const };
};

/**
 * The list's filters live in the URL, so a link (and the CSV and print buttons) show the same view. The setter takes
 * a change and merges it into the URL as it is when it runs, not into the view this render read: two quick changes
 * (a sort key, then its direction) both hold.
 */
export function useFilterParams(): [ListQuery, (change: Partial<ListQuery>) => void, string] {
  const [params, setParams] = useSearchParams();
  const filter = parse(params);
  const set = (change: Partial<ListQuery>) =>
    setParams(
      (old) =>
        Object.fromEntries(
          Object.entries({ ...parse(old), ...change }).filter(([k, v]) => v && !(k === "status" && v === "open")),
        ) as Record<string, string>,
      { replace: true },
    );
  return [filter, set, params.toString() ? `?${params.toString()}` : ""];
}
