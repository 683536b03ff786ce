import { useLookup } from "../../../features/inventory/api";
import type { PositionSearch } from "../../../features/photos/components/position-picker";

/**
 * The photo pages' site-wide search for a position: the inventory's look-up (designation, tag, circuit; the quick
 * log's own search), lent to the photos feature as `useSiteSearch` (features never import each other).
 */
export function useSitePositionSearch(siteId: string, typed: string): PositionSearch {
  const q = typed.trim().slice(0, 60); // the look-up takes at most 60 characters
  const found = useLookup(siteId, q);
  return {
    targets: (found.data ?? []).map((m) => ({
      positionId: m.positionId,
      boardId: m.boardId,
      boardName: m.boardName,
      designation: m.designation,
      tagNumber: m.tagNumber,
      componentId: m.componentId,
    })),
    pending: !!q && found.isPending,
    failed: found.isError,
  };
}
