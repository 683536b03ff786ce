import type { Role } from "../../src/domain/vocab";
import { findUserByEmail, insertUser } from "../auth/repository";
import { hashPassword } from "../auth/password";
import type { Db } from "../db";
import { AppError, conflict, notFound } from "../errors";
import * as repo from "./repository";

export async function addMember(db: Db, siteId: string, email: string, role: Role) {
  const user = await findUserByEmail(db, email);
  if (!user) throw new AppError(404, "no_such_user", "No account uses that e-mail address yet. Invite them instead.", { email: "No account with this address" });
  await repo.upsertMembership(db, siteId, user.id, role);
}

/** A site always keeps at least one curator, so nobody locks the crew out of its own board. */
export async function changeRole(db: Db, siteId: string, userId: string, role: Role) {
  await db.transaction().execute(async (trx) => {
    const members = await repo.listMembers(trx, siteId);
    const m = members.find((x) => x.userId === userId);
    if (!m) throw notFound("That member");
    if (m.role === "curator" && role !== "curator" && (await repo.countCurators(trx, siteId)) <= 1)
      throw conflict("A site needs at least one curator. Make someone else curator first.");
    await repo.upsertMembership(trx, siteId, userId, role);
  });
}

export async function removeMember(db: Db, siteId: string, userId: string) {
  await db.transaction().execute(async (trx) => {
    const members = await repo.listMembers(trx, siteId);
    const m = members.find((x) => x.userId === userId);
    if (!m) throw notFound("That member");
    if (m.role === "curator" && (await repo.countCurators(trx, siteId)) <= 1)
      throw conflict("A site needs at least one curator. Make someone else curator first.");
    await repo.deleteMembership(trx, siteId, userId);
  });
}

export async function createUser(db: Db, u: { email: string; name: string; password: string; isAdmin: boolean }) {
  if (await findUserByEmail(db, u.email)) throw new AppError(409, "email_taken", "An account with that e-mail already exists.", { email: "Already in use" });
  return insertUser(db, { email: u.email, name: u.name, passwordHash: await hashPassword(u.password), isAdmin: u.isAdmin });
}
