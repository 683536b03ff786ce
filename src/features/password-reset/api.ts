import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { z } from "zod";
import { api } from "../../lib/api-client";
import { resetPreview, resetRequestResponse, type ChangePasswordBody } from "../../schemas/account";

export const resetKeys = {
  all: ["password-reset"] as const,
  preview: (token: string) => [...resetKeys.all, token] as const,
};

export const useRequestReset = () =>
  useMutation({
    mutationFn: (email: string) => api.send("POST", "/api/auth/password-reset", { email }, resetRequestResponse),
  });

export const useResetPreview = (token: string) =>
  useQuery({
    queryKey: resetKeys.preview(token),
    queryFn: ({ signal }) => api.get(`/api/auth/password-reset/${token}`, resetPreview, signal),
    staleTime: Infinity,
  });

/** The new password signs this browser in (and every other session out). */
export function useCompleteReset(token: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (password: string) =>
      api.send("POST", `/api/auth/password-reset/${token}`, { password }, z.object({ ok: z.boolean() })),
    onSuccess: () => qc.invalidateQueries(),
  });
}

/** A signed-in change: the current password is required; every other session ends, this one is renewed. */
export function useChangePassword() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (b: ChangePasswordBody) => api.send("POST", "/api/account/password", b, z.object({ ok: z.boolean() })),
    onSuccess: () => qc.invalidateQueries(),
  });
}
