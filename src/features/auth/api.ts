import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { sessionResponse, type SignInBody } from "../../schemas/auth";
import { api, ApiError } from "../../lib/api-client";

export const authKeys = { all: ["auth"] as const, session: () => [...authKeys.all, "session"] as const };

/** The signed-in user and their sites; null when signed out (401 is an answer, not an error). */
export const sessionQueryOptions = () =>
  queryOptions({
    queryKey: authKeys.session(),
    queryFn: async ({ signal }) => {
      try {
        return await api.get("/api/session", sessionResponse, signal);
      } catch (e) {
        if (e instanceof ApiError && e.status === 401) return null;
        throw e;
      }
    },
    staleTime: 60_000,
  });

export const useSession = () => useQuery(sessionQueryOptions());

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: SignInBody) =>
      api.send("POST", "/api/auth/sign-in", body, z.object({ user: z.object({ id: z.string() }) })),
    onSuccess: () => qc.invalidateQueries({ queryKey: authKeys.all }),
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.send("POST", "/api/auth/sign-out", {}, z.object({ ok: z.boolean() })),
    onSuccess: () => {
      qc.clear();
      qc.setQueryData(authKeys.session(), null);
    },
  });
}
