import { randomBytes } from "node:crypto";
import type { Role } from "../../src/domain/vocab";
import { hashPassword } from "../../server/auth/password";
import type { Db } from "../../server/db";
import { TEST_PASSWORD } from "./http";

let cachedHash: Promise<string> | null = null;
const passwordHash = () => (cachedHash ??= hashPassword(TEST_PASSWORD));

export async function makeSite(db: Db, name = "Test hulk") {
  return db
    .insertInto("sites")
    .values({ name, kind: "vessel", location: "Test berth", description: "" })
    .returning("id")
    .executeTakeFirstOrThrow();
}

export async function makeUser(
  db: Db,
  opts: { siteId?: string; role?: Role; isAdmin?: boolean; email?: string; name?: string } = {},
) {
  const email = opts.email ?? `${opts.role ?? "user"}-${randomBytes(4).toString("hex")}@example.test`;
  const u = await db
    .insertInto("users")
    .values({
      email,
      name: opts.name ?? `Test ${opts.role ?? "user"}`,
      passwordHash: await passwordHash(),
      isAdmin: opts.isAdmin ?? false,
    })
    .returning(["id", "email"])
    .executeTakeFirstOrThrow();
  if (opts.siteId && opts.role)
    await db.insertInto("memberships").values({ siteId: opts.siteId, userId: u.id, role: opts.role }).execute();
  return u;
}

/** A site with one member of every role, each with a signed-in-ready e-mail. */
export async function makeCrew(db: Db) {
  const site = await makeSite(db);
  const crew = {} as Record<Role | "admin" | "outsider", { id: string; email: string }>;
  for (const role of ["curator", "volunteer", "photographer", "scrounger", "viewer"] as Role[])
    crew[role] = await makeUser(db, { siteId: site.id, role });
  crew.admin = await makeUser(db, { isAdmin: true });
  const other = await makeSite(db, "Another crew's site");
  crew.outsider = await makeUser(db, { siteId: other.id, role: "curator" });
  return { siteId: site.id, otherSiteId: other.id, crew };
}
