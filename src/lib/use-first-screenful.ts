import { startTransition, useDeferredValue, useEffect, useMemo, useState } from "react";

/** About a phone screen's worth of rows, with a margin. */
export const FIRST = 25;

const NONE: never[] = [];

/**
 * A long list drawn after the page around it. The render that first shows the list draws none of its rows (the
 * caller reserves their height, `rowsAwaited`), so the page's heading and what stands above the list paint in that
 * task; the first screenful is drawn on a render React does right after in the background (useDeferredValue with an
 * initial value: a transition, which hands the main thread back to the browser every few milliseconds), and the rest
 * of a longer list on one more transition once that has been committed. Without the first step a page whose reads
 * are already answered when it first renders (src/lib/early-reads.ts) drew its heading and all of its rows in one
 * task, and the heading's paint (the page's largest contentful paint) waited for the rows. A later change of the list
 * is deferred the same way (the rows on screen stay until the new ones are drawn).
 */
export function useFirstScreenful<T>(items: T[]): T[] {
  const drawn = useDeferredValue(items, NONE as T[]);
  const [whole, setWhole] = useState(false);
  const long = drawn.length > FIRST;
  useEffect(() => {
    if (long && !whole) startTransition(() => setWhole(true));
  }, [long, whole]);
  return useMemo(() => (long && !whole ? drawn.slice(0, FIRST) : drawn), [drawn, long, whole]);
}

/** Whether a list drawn through useFirstScreenful has rows to show and none drawn yet: its height is to be reserved. */
export const rowsAwaited = (items: unknown[], shown: unknown[]) => shown.length === 0 && items.length > 0;
