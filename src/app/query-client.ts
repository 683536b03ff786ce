import { QueryClient } from "@tanstack/react-query";
import { ApiError } from "../lib/api-client";

/** The one query cache: the provider hands it to React, the router's loaders prefetch into it. */
export const queryClient = new QueryClient({
  defaultOptions: {
    queries: {
      staleTime: 15_000,
      // A 4xx will not change by asking again; a dropped connection might.
      retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
      refetchOnWindowFocus: false,
    },
  },
});
