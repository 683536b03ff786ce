import { z } from "zod";
import { text } from "./common";
import { ROLES } from "../domain/vocab";

export const signInBody = z.object({
  email: text().trim().toLowerCase().email({ message: "Enter an e-mail address" }).max(254),
  password: text().min(1, { message: "Enter your password" }).max(1024),
});
export type SignInBody = z.infer<typeof signInBody>;

export const passwordRule = text()
  .min(10, { message: "Use at least 10 characters" })
  .max(1024, { message: "That password is too long" });

export const membershipSchema = z.object({
  siteId: text(),
  siteName: text(),
  role: z.enum(ROLES),
});
export type Membership = z.infer<typeof membershipSchema>;

export const sessionResponse = z.object({
  user: z.object({ id: text(), email: text(), name: text(), isAdmin: z.boolean() }),
  memberships: z.array(membershipSchema),
});
export type SessionResponse = z.infer<typeof sessionResponse>;
