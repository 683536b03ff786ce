import { createHash, randomBytes } from "node:crypto";

/**
 * Single-use link tokens (invitations, password resets): 32 random bytes in the link
 * (base64url, 43 characters); only the SHA-256 hash is stored, so a copy of the
 * database cannot be turned into working links.
 */
export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString("base64url");
  return { token, hash: hashToken(token) };
}

export const hashToken = (token: string) => createHash("sha256").update(token, "utf8").digest("hex");
