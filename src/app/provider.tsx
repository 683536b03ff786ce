import { PersistQueryClientProvider } from "@tanstack/react-query-persist-client";
import type { Query } from "@tanstack/react-query";
import { useEffect, type ReactNode } from "react";
import { onSynced } from "../lib/outbox";
import { onPhotosFiled } from "../lib/photos-filed";
import { MAX_AGE_MS, persister, shouldKeepQuery } from "./persist";
import { queryClient } from "./query-client";

/** A read whose data is older than this page: it came back from the phone (IndexedDB), not from the server. */
export const restoredFromPhone = (q: Query, pageStart: number = performance.timeOrigin) =>
  q.state.dataUpdatedAt > 0 && q.state.dataUpdatedAt < pageStart;

export function AppProvider({ children }: { children: ReactNode }) {
  // What the outbox sent changes boards, positions and readings: refetch what is on screen (an inspection or a
  // custody move: just its board's page, src/features/inventory/query-cache.ts).
  useEffect(() => {
    // Imported when a sync ends, not with the entry: the module brings the inventory's zod schemas (~29 KiB gzip),
    // which would otherwise sit in the initial bundle of every page.
    const stop = onSynced(
      (items) =>
        void import("../features/inventory/query-cache").then(({ afterSync }) => afterSync(queryClient, items)),
    );
    // A photo filed, moved or deleted: its positions' tiles and details (src/lib/photos-filed.ts), loaded the same way.
    const stopPhotos = onPhotosFiled(({ siteId, positions }) =>
      import("../features/inventory/query-cache").then(({ afterPhotosFiled }) =>
        afterPhotosFiled(queryClient, siteId, positions),
      ),
    );
    return () => {
      void stop();
      stopPhotos();
    };
  }, []);
  return (
    <PersistQueryClientProvider
      client={queryClient}
      persistOptions={{
        persister,
        maxAge: MAX_AGE_MS,
        buster: "tideline-1",
        dehydrateOptions: { shouldDehydrateQuery: shouldKeepQuery },
      }}
      // What the phone kept is shown at once but is only as new as the last write to IndexedDB (throttled):
      // a reload right after a save restored the old order and, being "fresh", never asked again. With a
      // network, mark what came back from the phone stale so what is on screen is fetched again; with none, keep
      // it as it is. Reads answered since this page started (the entry's early reads, the routes' loaders) are
      // left alone: asking for them again only doubled a cold start's requests.
      onSuccess={() => {
        if (navigator.onLine) void queryClient.invalidateQueries({ predicate: restoredFromPhone });
      }}
    >
      {children}
    </PersistQueryClientProvider>
  );
}
