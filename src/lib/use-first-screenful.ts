import { useDeferredValue } from "react";

/** About a phone screen's worth of rows, with a margin. */
const FIRST = 25;

/**
 * A long list's first screenful on the render that first shows it, and the whole list on a render React does right
 * after in the background (useDeferredValue with an initial value: a transition, which hands the main thread back
 * to the browser every few milliseconds). The page paints with its first rows instead of waiting for all of them,
 * and drawing a page of 200 rows is never one long task. A later change of the list is deferred the same way (the
 * rows on screen stay until the new ones are drawn).
 */
export function useFirstScreenful<T>(items: T[]): T[] {
  return useDeferredValue(items, items.length > FIRST ? items.slice(0, FIRST) : items);
}
