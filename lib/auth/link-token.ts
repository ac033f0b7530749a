import "server-only";
import { createHash, randomBytes } from "node:crypto";

/*
 * Secrets carried in e-mailed links (invitations, password resets). Only the sha256 of a
 * secret is stored, so a copy of the database cannot be used to accept or reset anything.
 */

/** A new URL-safe secret with 256 bits of entropy and its hash for storage. */
export function newLinkToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString("base64url");
  return { token, hash: hashLinkToken(token) };
}

/** sha256 (hex) of a link secret, as stored in token_hash columns. */
export function hashLinkToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

/** A link secret has this shape; anything else is refused before touching the database. */
export function isLinkTokenShape(token: string): boolean {
  return /^[A-Za-z0-9_-]{43}$/.test(token);
}
