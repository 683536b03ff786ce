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
