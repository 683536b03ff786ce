import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../lib/api-client";
import { notificationPrefsResponse, type NotificationKey } from "../../schemas/account";

export const notificationKeys = {
  all: ["notification-prefs"] as const,
  mine: () => [...notificationKeys.all, "mine"] as const,
};

export const notificationPrefsQueryOptions = () =>
  queryOptions({
    queryKey: notificationKeys.mine(),
    queryFn: ({ signal }) =>
      api.get("/api/account/notifications", notificationPrefsResponse, signal).then((d) => d.prefs),
  });
export const useNotificationPrefs = () => useQuery(notificationPrefsQueryOptions());

export function useSetNotification() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (b: { key: NotificationKey; enabled: boolean }) =>
      api.send("PUT", `/api/account/notifications/${b.key}`, { enabled: b.enabled }, notificationPrefsResponse),
    onSuccess: (d) => qc.setQueryData(notificationKeys.mine(), d.prefs),
  });
}
