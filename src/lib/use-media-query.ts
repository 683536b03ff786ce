import { useSyncExternalStore } from "react";

/**
 * Whether a CSS media query matches now (window.matchMedia), kept current as the window changes size or turns;
 * read through useSyncExternalStore, so the first render already has the answer and draws one layout, not two.
 * `whenUnknown` is the answer where there is no window (never in this client; a test renderer without matchMedia).
 */
export function useMediaQuery(query: string, whenUnknown = true): boolean {
  return useSyncExternalStore(
    (changed) => {
      const media = window.matchMedia?.(query);
      media?.addEventListener("change", changed);
      return () => media?.removeEventListener("change", changed);
    },
    () => (typeof window === "undefined" || !window.matchMedia ? whenUnknown : window.matchMedia(query).matches),
    () => whenUnknown,
  );
}
