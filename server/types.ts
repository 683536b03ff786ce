import type { Session, User } from "lucia";
import type { Role } from "../src/domain/vocab";

declare global {
  namespace Express {
    interface Locals {
      user: User | null;
      session: Session | null;
      /** Set by requireSiteRole: the caller's role on the site in the URL. */
      siteRole?: Role | "admin";
    }
  }
}
export {};
