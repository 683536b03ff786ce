import type { Session, User } from "lucia";
import type { Role } from "../src/domain/vocab";

declare global {
  namespace Express {
    interface Locals {
      user: User | null;
      session: Session | null;
      /** Set by requireSiteRole: the caller's role on the site in the URL. */
      siteRole?: Role | "admin";
      /** Set by limitExports: frees the caller's download slot (idempotent); runExport calls it before the last byte. */
      releaseExportSlot?: () => Promise<void>;
    }
  }
}
export {};
