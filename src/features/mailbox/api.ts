import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../lib/api-client";
import { mailboxResponse } from "../../schemas/mailbox";

export const mailboxKeys = { all: ["mailbox"] as const, list: () => [...mailboxKeys.all, "list"] as const };

export const mailboxQueryOptions = () =>
  queryOptions({
    queryKey: mailboxKeys.list(),
    queryFn: ({ signal }) => api.get("/api/admin/mailbox", mailboxResponse, signal).then((d) => d.messages),
    // New mail shows up without a reload while someone waits for an invitation.
    refetchInterval: 5000,
  });
export const useMailbox = () => useQuery(mailboxQueryOptions());

export function useEmptyMailbox() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.send("DELETE", "/api/admin/mailbox", undefined, mailboxResponse),
    onSuccess: (d) => qc.setQueryData(mailboxKeys.list(), d.messages),
  });
}
