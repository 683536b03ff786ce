import { z } from "zod";
import { ROLES } from "../domain/vocab";

export const SITE_KINDS = ["vessel", "building", "plant"] as const;

export const createSiteBody = z.object({
  name: z.string().trim().min(1, { message: "Give the site a name" }).max(200),
  kind: z.enum(SITE_KINDS),
  location: z.string().trim().max(200).default(""),
  description: z.string().trim().max(4000).default(""),
});

export const siteSchema = z.object({
  id: z.string(),
  name: z.string(),
  kind: z.enum(SITE_KINDS),
  location: z.string(),
  description: z.string(),
  role: z.enum([...ROLES, "admin"]),
});
export type SiteSummary = z.infer<typeof siteSchema>;

export const memberSchema = z.object({
  userId: z.string(),
  email: z.string(),
  name: z.string(),
  role: z.enum(ROLES),
});
export type Member = z.infer<typeof memberSchema>;

export const addMemberBody = z.object({
  email: z.string().trim().toLowerCase().email({ message: "Enter an e-mail address" }),
  role: z.enum(ROLES),
});
export const changeRoleBody = z.object({ role: z.enum(ROLES) });

export const createUserBody = z.object({
  email: z.string().trim().toLowerCase().email({ message: "Enter an e-mail address" }),
  name: z.string().trim().min(1).max(200),
  password: z.string().min(10, { message: "Use at least 10 characters" }).max(1024),
  isAdmin: z.boolean().default(false),
});
