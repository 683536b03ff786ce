import { z } from "zod";
import { text } from "./common";
import { passwordRule } from "./auth";
import { rolesFor } from "../domain/permissions";
import type { Role } from "../domain/vocab";

export const resetRequestBody = z.object({
  email: text().trim().toLowerCase().email({ message: "Enter an e-mail address" }).max(254),
});
/** The one answer to every reset request, whether or not an account uses the address. */
export const RESET_REQUEST_MESSAGE =
  "If an account uses that address, a link to set a new password is on its way. It works once, for one hour.";
export const resetRequestResponse = z.object({ ok: z.literal(true), message: text() });

export const resetPasswordBody = z.object({ password: passwordRule });

/** A signed-in person changes their password: the current one is required (a left-open session is not enough). */
export const changePasswordBody = z
  .object({
    currentPassword: text().min(1, { message: "Enter your current password" }).max(1024),
    newPassword: passwordRule,
  })
  .refine((b) => b.currentPassword !== b.newPassword, {
    path: ["newPassword"],
    message: "Choose a password different from the current one",
  });
export type ChangePasswordBody = z.infer<typeof changePasswordBody>;
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

/**
 * Who receives each e-mail: the one table the server (GET/PUT /api/account/notifications) and the
 * account page read, written from the senders' own rules. A defect is assigned by the curator to
 * someone who works on it (any role but a viewer, who only reads); a repair waits for the site's
 * curators, who also get the weekly summary; an overdue watch check goes to the person named on the
 * stage, who must be able to sign it (`rts.sign`). The account page offers a person only the e-mails
 * one of their roles receives (Tideline's own rule, from the roles in the brief).
 */
export const NOTIFICATION_AUDIENCE: Record<NotificationKey, readonly Role[]> = {
  defect_assigned: ["curator", "volunteer", "photographer", "scrounger"],
  awaiting_verification: rolesFor("defects.manage"),
  weekly_summary: ["curator"],
  watch_overdue: rolesFor("rts.sign"),
};

/** The e-mails someone holding these roles (on any of their sites) may receive, in the table's order. */
export const notificationsFor = (roles: readonly Role[]): NotificationKey[] =>
  NOTIFICATION_KEYS.filter((k) => NOTIFICATION_AUDIENCE[k].some((r) => roles.includes(r)));

export const notificationPrefsResponse = z.object({
  prefs: z.array(z.object({ key: z.enum(NOTIFICATION_KEYS), enabled: z.boolean() })),
});
export const notificationKeyParam = z.object({ key: z.enum(NOTIFICATION_KEYS) });
export const setNotificationBody = z.object({ enabled: z.boolean() });
