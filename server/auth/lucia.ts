import { Lucia, TimeSpan } from "lucia";
import type { Db } from "../db";
import { kyselyAdapter } from "./session-repository";

export function createLucia(db: Db) {
  return new Lucia(kyselyAdapter(db), {
    sessionExpiresIn: new TimeSpan(14, "d"),
    sessionCookie: { name: "tideline_session", attributes: { sameSite: "lax", secure: false } },
    getUserAttributes: (a) => ({ email: a.email, name: a.name, isAdmin: a.isAdmin }),
  });
}

export type AppLucia = ReturnType<typeof createLucia>;

declare module "lucia" {
  interface Register {
    Lucia: AppLucia;
    DatabaseUserAttributes: { email: string; name: string; isAdmin: boolean };
  }
}
