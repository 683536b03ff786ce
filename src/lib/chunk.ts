/**
 * A chunk of the client's code that could not be fetched: no signal before the service worker had kept it, or a
 * new version deployed since the page was opened (the old chunk's file is gone). Thrown by the loads of `laterPart`,
 * so its boundary can tell it from a fault in the code itself.
 */
export class ChunkNotLoaded extends Error {
  override name = "ChunkNotLoaded";
  constructor(what: string, cause: unknown) {
    super(`${what} could not be loaded`, { cause });
  }
}

/** `load`, its failure marked as a chunk that did not arrive. */
export function markChunk<T>(what: string, load: () => Promise<T>): () => Promise<T> {
  return () =>
    load().catch((e: unknown) => {
      throw e instanceof ChunkNotLoaded ? e : new ChunkNotLoaded(what, e);
    });
}
