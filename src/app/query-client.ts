import { QueryClient, onlineManager } from "@tanstack/react-query";
import { ApiError } from "../lib/api-client";
import { subscribeOnline } from "../lib/outbox";

// Reads pause (keeping what the phone has) whenever the outbox's probe finds no server, not only
// when the browser reports no network: a phone on a hull's dead Wi-Fi counts as offline too.
onlineManager.setEventListener(subscribeOnline);

/** The one query cache: the provider hands it to React, the router's loaders prefetch into it. */
export const queryClient = new QueryClient({
  defaultOptions: {
    queries: {
      staleTime: 15_000,
      // A 4xx will not change by asking again; a dropped connection might.
      retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
      refetchOnWindowFocus: false,
      // Kept in memory as long as on the phone (src/app/persist.ts), or they would not be persisted.
      gcTime: 3 * 24 * 3600_000,
    },
    // A form's create runs even with no signal: the field forms then keep it in the outbox
    // (src/lib/outbox) and the others say the server cannot be reached — never a silent pause.
    mutations: { networkMode: "always" },
  },
});
