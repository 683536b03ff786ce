import { Lucia, TimeSpan } from "lucia";
import type { Role } from "../../src/domain/vocab";
import type { Db } from "../db";
import { kyselyAdapter } from "./session-repository";

export function createLucia(db: Db) {
  return new Lucia(kyselyAdapter(db), {
    sessionExpiresIn: new TimeSpan(14, "d"),
    sessionCookie: { name: "tideline_session", attributes: { sameSite: "lax", secure: false } },
    getUserAttributes: (a) => ({ email: a.email, name: a.name, isAdmin: a.isAdmin, siteRoles: a.siteRoles }),
  });
}

export type AppLucia = ReturnType<typeof createLucia>;

declare module "lucia" {
  interface Register {
    Lucia: AppLucia;
    /** `siteRoles`: the person's role on each site they are a member of (by site id), read with the session. */
    DatabaseUserAttributes: { email: string; name: string; isAdmin: boolean; siteRoles: Record<string, Role> };
  }
}
