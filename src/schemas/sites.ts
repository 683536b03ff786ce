import { z } from "zod";
import { text } from "./common";
import { ROLES } from "../domain/vocab";
import { isTimeZone } from "../domain/local-time";
import { isCurrency } from "../domain/money";

export const SITE_KINDS = ["vessel", "building", "plant"] as const;

export const createSiteBody = z.object({
  name: text().trim().min(1, { message: "Give the site a name" }).max(200),
  kind: z.enum(SITE_KINDS),
  location: text().trim().max(200).default(""),
  description: text().trim().max(4000).default(""),
  timeZone: text()
    .trim()
    .default("UTC")
    .refine(isTimeZone, { message: "Give a time zone such as Europe/Lisbon or America/Halifax" }),
});

/** The site's IANA time zone: exports write local times in it and say so. */
export const siteTimeZoneBody = z.object({
  timeZone: text().trim().refine(isTimeZone, { message: "Give a time zone such as Europe/Lisbon or America/Halifax" }),
});

/**
 * The site's currency (ISO 4217 code): every cost is shown and entered in it. `from` is the code the
 * form was showing; when someone else changed it meanwhile the answer is 409, never a silent overwrite.
 */
export const siteCurrencyBody = z.object({
  currency: text()
    .trim()
    .toUpperCase()
    .refine(isCurrency, { message: "Give an ISO 4217 currency code such as EUR, USD or NOK" }),
  from: text().trim().toUpperCase().max(3).optional(),
});

export const siteSchema = z.object({
  id: text(),
  name: text(),
  kind: z.enum(SITE_KINDS),
  location: text(),
  description: text(),
  /** IANA zone of the site's local time (exports); "UTC" until a curator sets it. */
  timeZone: text().default("UTC"),
  /** ISO 4217 code every money figure on the site is in; "USD" until a curator sets it. */
  currency: text().default("USD"),
  role: z.enum([...ROLES, "admin"]),
});
export type SiteSummary = z.infer<typeof siteSchema>;

export const memberSchema = z.object({
  userId: text(),
  email: text(),
  name: text(),
  role: z.enum(ROLES),
  /** The instance's admin has suspended the account: it cannot sign in and gets no e-mail (server/auth/suspension.ts). */
  suspended: z.boolean(),
});
export type Member = z.infer<typeof memberSchema>;

export const changeRoleBody = z.object({ role: z.enum(ROLES) });

/** An account as the instance admin's list shows it: who, whether an instance admin, and each site with the role. */
export const accountSchema = z.object({
  id: text(),
  email: text(),
  name: text(),
  isAdmin: z.boolean(),
  createdAt: text(),
  /** Set while an instance admin has the account suspended: it cannot sign in and gets no e-mail. */
  suspended: z.object({ at: text(), byName: text().nullable(), reason: text() }).nullable(),
  sites: z.array(z.object({ siteId: text(), siteName: text(), role: z.enum(ROLES) })),
});
export type Account = z.infer<typeof accountSchema>;

/** Why an account is suspended: kept with it and in the audit log. */
export const suspendAccountBody = z
  .object({
    reason: text()
      .trim()
      .min(3, { message: "Say why, for the record (at least 3 characters)" })
      .max(500, { message: "At most 500 characters" }),
  })
  .strict();

/** An account made an instance admin, or no longer one. */
export const instanceAdminBody = z.object({ isAdmin: z.boolean({ message: "isAdmin is true or false" }) }).strict();

export const createUserBody = z.object({
  email: text().trim().toLowerCase().email({ message: "Enter an e-mail address" }),
  name: text().trim().min(1).max(200),
  password: text().min(10, { message: "Use at least 10 characters" }).max(1024),
  isAdmin: z.boolean().default(false),
});
