import { useEffect } from "react";

/**
 * Runs `fn` when the page is next idle (at the latest after `timeoutMs`), or at once where the browser cannot say.
 * Returns a function that cancels it.
 */
export function whenIdle(fn: () => void, timeoutMs = 500): () => void {
  if (typeof requestIdleCallback === "function") {
    const id = requestIdleCallback(fn, { timeout: timeoutMs });
    return () => cancelIdleCallback(id);
  }
  const id = setTimeout(fn, 0);
  return () => clearTimeout(id);
}

/**
 * Once `ready` (the page's own data is on screen), asks for the chunks of what the page shows only later at idle
 * time, at the latest 2 s on, so they are usually there before anyone opens them. `loads` is a constant list of the
 * chunks' imports (the same ones their `React.lazy` calls).
 */
export function useLoadWhenIdle(ready: boolean, loads: ReadonlyArray<() => Promise<unknown>>) {
  useEffect(() => {
    if (!ready) return;
    // a load that fails (no signal yet) is asked for again when the part is drawn, which says so in its place
    return whenIdle(() => loads.forEach((load) => void load().catch(() => undefined)), 2000);
  }, [ready, loads]);
}
