import { z } from "zod";
import { text } from "./common";
import { ROLES } from "../domain/vocab";
import { passwordRule } from "./auth";

export const INVITATION_DAYS = 7;

export const createInvitationBody = z.object({
  email: text().trim().toLowerCase().email({ message: "Enter an e-mail address" }).max(254),
  role: z.enum(ROLES),
});
export type CreateInvitationBody = z.infer<typeof createInvitationBody>;

export const SEND_STATUSES = ["pending", "sent", "failed"] as const;

/** A live invitation as the curator sees it. sendError is filled only for instance admins. */
export const invitationSchema = z.object({
  id: text(),
  email: text(),
  role: z.enum(ROLES),
  invitedByName: text().nullable(),
  createdAt: text(),
  expiresAt: text(),
  expired: z.boolean(),
  sendStatus: z.enum(SEND_STATUSES),
  sendError: text().nullable(),
  lastSentAt: text().nullable(),
});
export type Invitation = z.infer<typeof invitationSchema>;

export const invitationsResponse = z.object({ invitations: z.array(invitationSchema) });

/** Every address gets an invitation to accept, whether or not it has an account: the answer is the same. */
export const createInvitationResponse = z.object({
  outcome: z.literal("invited"),
  invitation: invitationSchema.nullable(),
  invitations: z.array(invitationSchema),
});

/** What the public accept page shows to whoever holds the link. */
export const invitationPreview = z.object({
  siteName: text(),
  role: z.enum(ROLES),
  email: text(),
  invitedByName: text().nullable(),
  expiresAt: text(),
  accountExists: z.boolean(),
});
export type InvitationPreview = z.infer<typeof invitationPreview>;

export const acceptNewAccountBody = z.object({
  name: text().trim().min(1, { message: "Enter your name" }).max(200),
  password: passwordRule,
});
export const acceptExistingAccountBody = z.object({
  password: text().min(1, { message: "Enter your password" }).max(1024),
});
export const acceptInvitationBody = z.object({
  name: text().max(200).optional(),
  password: text().max(1024),
});
export const acceptInvitationResponse = z.object({ siteId: text() });
