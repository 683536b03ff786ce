import { z } from "zod";
import { ROLES } from "../domain/vocab";
import { passwordRule } from "./auth";

export const INVITATION_DAYS = 7;

export const createInvitationBody = z.object({
  email: z.string().trim().toLowerCase().email({ message: "Enter an e-mail address" }).max(254),
  role: z.enum(ROLES),
});
export type CreateInvitationBody = z.infer<typeof createInvitationBody>;

export const SEND_STATUSES = ["pending", "sent", "failed"] as const;

/** A live invitation as the curator sees it. sendError is filled only for instance admins. */
export const invitationSchema = z.object({
  id: z.string(),
  email: z.string(),
  role: z.enum(ROLES),
  invitedByName: z.string().nullable(),
  createdAt: z.string(),
  expiresAt: z.string(),
  expired: z.boolean(),
  sendStatus: z.enum(SEND_STATUSES),
  sendError: z.string().nullable(),
  lastSentAt: z.string().nullable(),
});
export type Invitation = z.infer<typeof invitationSchema>;

export const invitationsResponse = z.object({ invitations: z.array(invitationSchema) });

/** Inviting an address that already has an account adds the membership at once. */
export const createInvitationResponse = z.object({
  outcome: z.enum(["invited", "added"]),
  invitation: invitationSchema.nullable(),
  invitations: z.array(invitationSchema),
});

/** What the public accept page shows to whoever holds the link. */
export const invitationPreview = z.object({
  siteName: z.string(),
  role: z.enum(ROLES),
  email: z.string(),
  invitedByName: z.string().nullable(),
  expiresAt: z.string(),
  accountExists: z.boolean(),
});
export type InvitationPreview = z.infer<typeof invitationPreview>;

export const acceptNewAccountBody = z.object({
  name: z.string().trim().min(1, { message: "Enter your name" }).max(200),
  password: passwordRule,
});
export const acceptExistingAccountBody = z.object({
  password: z.string().min(1, { message: "Enter your password" }).max(1024),
});
export const acceptInvitationBody = z.object({
  name: z.string().max(200).optional(),
  password: z.string().max(1024),
});
export const acceptInvitationResponse = z.object({ siteId: z.string() });
