import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { accountSchema, memberSchema, siteSchema } from "../../schemas/sites";
import { api } from "../../lib/api-client";
import type { Role } from "../../domain/vocab";

export const siteKeys = {
  all: ["sites"] as const,
  list: () => [...siteKeys.all, "list"] as const,
  detail: (siteId: string) => [...siteKeys.all, "detail", siteId] as const,
  members: (siteId: string) => [...siteKeys.all, "members", siteId] as const,
  accounts: () => [...siteKeys.all, "accounts"] as const,
};

export const sitesQueryOptions = () =>
  queryOptions({
    queryKey: siteKeys.list(),
    queryFn: ({ signal }) =>
      api.get("/api/sites", z.object({ sites: z.array(siteSchema) }), signal).then((d) => d.sites),
  });

export const siteQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: siteKeys.detail(siteId),
    queryFn: ({ signal }) =>
      api.get(`/api/sites/${siteId}`, z.object({ site: siteSchema }), signal).then((d) => d.site),
  });

export const useSites = () => useQuery(sitesQueryOptions());
export const useSite = (siteId: string) => useQuery(siteQueryOptions(siteId));

const membersResponse = z.object({ members: z.array(memberSchema) });

export const useMembers = (siteId: string) =>
  useQuery({
    queryKey: siteKeys.members(siteId),
    queryFn: ({ signal }) => api.get(`/api/sites/${siteId}/members`, membersResponse, signal).then((d) => d.members),
  });

export function useMemberMutations(siteId: string) {
  const qc = useQueryClient();
  const onSuccess = (d: z.infer<typeof membersResponse>) => qc.setQueryData(siteKeys.members(siteId), d.members);
  return {
    change: useMutation({
      mutationFn: (b: { userId: string; role: Role }) =>
        api.send("PATCH", `/api/sites/${siteId}/members/${b.userId}`, { role: b.role }, membersResponse),
      onSuccess,
    }),
    remove: useMutation({
      mutationFn: (userId: string) =>
        api.send("DELETE", `/api/sites/${siteId}/members/${userId}`, undefined, membersResponse),
      onSuccess,
    }),
  };
}

export function useCreateSite() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (b: { name: string; kind: "vessel" | "building" | "plant"; location: string }) =>
      api.send("POST", "/api/sites", b, z.object({ site: siteSchema })).then((d) => d.site),
    onSuccess: () => qc.invalidateQueries({ queryKey: siteKeys.all }),
  });
}

export function useCreateUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (b: { email: string; name: string; password: string; isAdmin: boolean }) =>
      api.send("POST", "/api/admin/users", b, z.object({ user: z.object({ id: z.string(), email: z.string() }) })),
    onSuccess: () => qc.invalidateQueries({ queryKey: siteKeys.accounts() }),
  });
}

/** Every account of the instance with its sites and roles (instance admins only). */
export const useAccounts = () =>
  useQuery({
    queryKey: siteKeys.accounts(),
    queryFn: ({ signal }) =>
      api.get("/api/admin/users", z.object({ users: z.array(accountSchema) }), signal).then((d) => d.users),
  });

/**
 * An instance admin suspends an account (with the reason) or reinstates it, and makes an account an instance admin
 * or no longer one; each answer is the whole list as it now stands, put in place at once (server/auth/suspension.ts,
 * instance-admins.ts).
 */
export function useAccountStanding() {
  const qc = useQueryClient();
  const accounts = z.object({ users: z.array(accountSchema) });
  const onSuccess = (d: z.infer<typeof accounts>) => qc.setQueryData(siteKeys.accounts(), d.users);
  // Refused because another admin got there first: the list is read again, so it shows who and why.
  const onError = () => qc.invalidateQueries({ queryKey: siteKeys.accounts() });
  const at = (userId: string) => `/api/admin/users/${userId}/suspension`;
  return {
    suspend: useMutation({
      mutationFn: (b: { userId: string; reason: string }) =>
        api.send("POST", at(b.userId), { reason: b.reason }, accounts),
      onSuccess,
      onError,
    }),
    reinstate: useMutation({
      mutationFn: (userId: string) => api.send("DELETE", at(userId), undefined, accounts),
      onSuccess,
      onError,
    }),
    setAdmin: useMutation({
      mutationFn: (b: { userId: string; isAdmin: boolean }) =>
        api.send("PUT", `/api/admin/users/${b.userId}/instance-admin`, { isAdmin: b.isAdmin }, accounts),
      onSuccess,
      onError,
    }),
  };
}

/** The curator sets the site's time zone: exports write local times in it and name it. */
export function useSetTimeZone(siteId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (timeZone: string) =>
      api
        .send("PUT", `/api/sites/${siteId}/time-zone`, { timeZone }, z.object({ site: siteSchema }))
        .then((d) => d.site),
    onSuccess: () => qc.invalidateQueries({ queryKey: siteKeys.all }),
  });
}

/** The curator sets the site's currency; `from` is the one the form showed (409 if it changed meanwhile). */
export function useSetCurrency(siteId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (b: { currency: string; from: string }) =>
      api.send("PUT", `/api/sites/${siteId}/currency`, b, z.object({ site: siteSchema })).then((d) => d.site),
    onSettled: () => qc.invalidateQueries({ queryKey: siteKeys.all }),
  });
}
