import { useSyncExternalStore } from "react";
import { flushSync } from "react-dom";

let beforePrint = false;
const printMedia = () => (typeof window === "undefined" ? null : (window.matchMedia?.("print") ?? null));
const snapshot = () => beforePrint || printMedia()?.matches === true;

function subscribe(changed: () => void) {
  // `beforeprint` fires before the browser lays the page out for paper: render at once (flushSync),
  // or the printout would catch the windowed DOM.
  const before = () => {
    beforePrint = true;
    flushSync(changed);
  };
  const after = () => {
    beforePrint = false;
    changed();
  };
  const media = printMedia();
  window.addEventListener("beforeprint", before);
  window.addEventListener("afterprint", after);
  media?.addEventListener("change", changed);
  return () => {
    window.removeEventListener("beforeprint", before);
    window.removeEventListener("afterprint", after);
    media?.removeEventListener("change", changed);
  };
}

/**
 * True while the page is printed (between `beforeprint` and `afterprint`) or shown in print media
 * (print emulation in DevTools or Playwright's emulateMedia), so a windowed list draws every row
 * for the paper. Read through useSyncExternalStore, so each render sees the media as it is.
 */
export function usePrinting(): boolean {
  return useSyncExternalStore(subscribe, snapshot, () => false);
}
