import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import type { Role } from "../../domain/vocab";
import { api } from "../../lib/api-client";
import {
  acceptInvitationResponse,
  createInvitationResponse,
  invitationPreview,
  invitationSchema,
  invitationsResponse,
} from "../../schemas/invitations";

export const invitationKeys = {
  all: ["invitations"] as const,
  list: (siteId: string) => [...invitationKeys.all, "list", siteId] as const,
  preview: (token: string) => [...invitationKeys.all, "preview", token] as const,
};

export const invitationsQueryOptions = (siteId: string) =>
  queryOptions({
    queryKey: invitationKeys.list(siteId),
    queryFn: ({ signal }) =>
      api.get(`/api/sites/${siteId}/invitations`, invitationsResponse, signal).then((d) => d.invitations),
    // While an e-mail waits in the outbox, look again every two seconds until it has gone.
    refetchInterval: (q) => (q.state.data?.some((i) => i.sendStatus === "pending" && !i.expired) ? 2000 : false),
  });
export const useInvitations = (siteId: string) => useQuery(invitationsQueryOptions(siteId));

export function useInvitationMutations(siteId: string) {
  const qc = useQueryClient();
  const setList = (d: { invitations: z.infer<typeof invitationSchema>[] }) =>
    qc.setQueryData(invitationKeys.list(siteId), d.invitations);
  return {
    create: useMutation({
      mutationFn: (b: { email: string; role: Role }) =>
        api.send("POST", `/api/sites/${siteId}/invitations`, b, createInvitationResponse),
      onSuccess: setList,
    }),
    resend: useMutation({
      mutationFn: (id: string) =>
        api.send(
          "POST",
          `/api/sites/${siteId}/invitations/${id}/resend`,
          {},
          invitationsResponse.extend({ invitation: invitationSchema }),
        ),
      onSuccess: setList,
    }),
    revoke: useMutation({
      mutationFn: (id: string) =>
        api.send("DELETE", `/api/sites/${siteId}/invitations/${id}`, undefined, invitationsResponse),
      onSuccess: setList,
    }),
  };
}

export const useInvitationPreview = (token: string) =>
  useQuery({
    queryKey: invitationKeys.preview(token),
    queryFn: ({ signal }) =>
      api
        .get(`/api/invitations/${token}`, z.object({ invitation: invitationPreview }), signal)
        .then((d) => d.invitation),
    staleTime: Infinity,
  });

/** Accepting signs the invitee in: every cached answer (the session first) is out of date. */
export function useAcceptInvitation(token: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (b: { name?: string; password: string }) =>
      api.send("POST", `/api/invitations/${token}/accept`, b, acceptInvitationResponse),
    onSuccess: () => qc.invalidateQueries(),
  });
}
