import { useSearchParams } from "react-router";
import { listQuery, type ListQuery } from "../../schemas/parts";

/** The list's filters live in the URL, so a link (and the CSV and print buttons) show the same view. */
export function useFilterParams(): [ListQuery, (f: ListQuery) => void, string] {
  const [params, setParams] = useSearchParams();
  const parsed = listQuery.safeParse(Object.fromEntries(params));
  const filter = parsed.success ? parsed.data : { status: "open" as const };
  const set = (f: ListQuery) =>
    setParams(
      Object.fromEntries(Object.entries(f).filter(([k, v]) => v && !(k === "status" && v === "open"))) as Record<
        string,
        string
      >,
      { replace: true },
    );
  return [filter, set, params.toString() ? `?${params.toString()}` : ""];
}
