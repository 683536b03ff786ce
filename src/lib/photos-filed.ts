/**
 * A photo write changes what other features show (a board tile counts its position's photos; a position's detail lists
 * its history). Features never import each other, so the photo feature says here which positions its write touched
 * and the app joins it to the inventory (src/app/provider.tsx), as the outbox's `onSynced` does after a sync.
 */

/** The positions a photo write touched, before and after it: a position id; `null` a photo of the board itself or
 * unfiled (nothing in the inventory counts it); `undefined` a position this client does not know (the photo was never
 * read here), so the site's whole inventory is read again. */
export interface PhotosFiled {
  siteId: string;
  positions: ReadonlyArray<string | null | undefined>;
}

type Listener = (change: PhotosFiled) => unknown;
const listeners = new Set<Listener>();

export function onPhotosFiled(listener: Listener) {
  listeners.add(listener);
  return () => void listeners.delete(listener);
}

/** Resolves once every listener has read again what the change made out of date. */
export async function photosFiled(change: PhotosFiled) {
  await Promise.all([...listeners].map((l) => l(change)));
}
