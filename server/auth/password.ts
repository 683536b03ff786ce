import { hash, verify } from "@node-rs/argon2";

// OWASP Password Storage Cheat Sheet, minimum for argon2id: m=19 MiB, t=2, p=1.
const OPTIONS = {
  algorithm: 2 /* Algorithm.Argon2id (a const enum) */,
  memoryCost: 19456,
  timeCost: 2,
  parallelism: 1,
} as const;

export const hashPassword = (password: string) => hash(password, OPTIONS);

export async function verifyPassword(passwordHash: string | null, password: string): Promise<boolean> {
  // Unknown users still pay for one verification so timing does not tell them apart.
  const target = passwordHash ?? DUMMY_HASH;
  try {
    const ok = await verify(target, password);
    return ok && passwordHash !== null;
  } catch {
    return false;
  }
}

const DUMMY_HASH = "$argon2id$v=19$m=19456,t=2,p=1$c29tZXNhbHRzb21lc2FsdA$4E9ypwl0cYH+ayvSOt0aSvpbi7A9Tb7hhgR2u2wY6Ec";
