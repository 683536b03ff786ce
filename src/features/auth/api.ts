import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { sessionResponse, type SignInBody } from "../../schemas/auth";
import { api, ApiError } from "../../lib/api-client";

export const authKeys = {
  all: ["auth"] as const,
  session: () => [...authKeys.all, "session"] as const,
  places: () => [...authKeys.all, "places"] as const,
};

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

const placesResponse = z.object({ places: z.number().int().min(0) });

/** In how many places this account is signed in, this one included (server/auth/other-sessions.ts). */
export const useSignedInPlaces = () =>
  useQuery({
    queryKey: authKeys.places(),
    queryFn: ({ signal }) => api.get("/api/account/sessions", placesResponse, signal).then((d) => d.places),
  });

/** Signs the account out everywhere but here; the answer says how many places were ended. */
export function useSignOutElsewhere() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () =>
      api.send(
        "POST",
        "/api/account/sessions/sign-out-others",
        {},
        placesResponse.extend({ ended: z.number().int().min(0) }),
      ),
    onSuccess: (d) => qc.setQueryData(authKeys.places(), d.places),
  });
}
