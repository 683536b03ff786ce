import { z } from "zod";
import { text } from "./common";
import { passwordRule } from "./auth";

export const resetRequestBody = z.object({
  email: text().trim().toLowerCase().email({ message: "Enter an e-mail address" }).max(254),
});
/** The one answer to every reset request, whether or not an account uses the address. */
export const RESET_REQUEST_MESSAGE =
  "If an account uses that address, a link to set a new password is on its way. It works once, for one hour.";
export const resetRequestResponse = z.object({ ok: z.literal(true), message: text() });

export const resetPasswordBody = z.object({ password: passwordRule });
export const resetPreview = z.object({ email: text() });

export const NOTIFICATION_KEYS = [
  "defect_assigned",
  "awaiting_verification",
  "weekly_summary",
  "watch_overdue",
] as const;
export type NotificationKey = (typeof NOTIFICATION_KEYS)[number];
export const NOTIFICATION_LABELS: Record<NotificationKey, { label: string; hint: string }> = {
  defect_assigned: {
    label: "A defect is assigned to me",
    hint: "An e-mail when someone makes you the person to fix a defect.",
  },
  awaiting_verification: {
    label: "A repair is waiting for my check",
    hint: "Curators: an e-mail when a repaired defect on your site needs verifying.",
  },
  weekly_summary: {
    label: "Weekly summary of my sites",
    hint: "Curators: once a week, what was surveyed, opened and closed, and what still blocks re-energisation.",
  },
  watch_overdue: {
    label: "A watch check is overdue on my stage",
    hint: "Qualified persons: an e-mail when a stage you are named for misses a watch check.",
  },
};

export const notificationPrefsResponse = z.object({
  prefs: z.array(z.object({ key: z.enum(NOTIFICATION_KEYS), enabled: z.boolean() })),
});
export const notificationKeyParam = z.object({ key: z.enum(NOTIFICATION_KEYS) });
export const setNotificationBody = z.object({ enabled: z.boolean() });
