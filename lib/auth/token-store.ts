import "server-only";
import { createHash } from "node:crypto";
import { db } from "@/lib/db/knex";

/*
 * The part of personal API tokens that session.ts needs too (kept apart from tokens.ts so the
 * two modules do not import each other).
 */

/** Every secret starts with this, so a leaked one is recognisable (and greppable) as ours. */
export const TOKEN_PREFIX = "glm_";

/** SHA-256 (hex) of a token secret: the only form in which a token is stored. */
export function hashTokenSecret(secret: string): string {
  return createHash("sha256").update(secret, "utf8").digest("hex");
}

const SECRET_SHAPE = /^glm_[A-Za-z0-9_-]{43}$/;

export type TokenUser = { id: string; email: string; displayName: string; tokenId: number };

/**
 * The person a live (not revoked) token secret belongs to, or null. Records the use in
 * last_used_at (at most once a minute per token, to keep scripted bursts cheap).
 */
export async function userForTokenSecret(secret: string): Promise<TokenUser | null> {
  if (!SECRET_SHAPE.test(secret)) return null;
  const [rows] = (await db.raw(
    `SELECT t.id AS token_id, u.id, u.email, u.display_name
       FROM api_tokens t JOIN users u ON u.id = t.user_id
      WHERE t.token_hash = ? AND t.revoked_at IS NULL`,
    [hashTokenSecret(secret)],
  )) as [Array<{ token_id: number; id: string; email: string; display_name: string }>];
  const row = rows[0];
  if (!row) return null;
  await db.raw(
    `UPDATE api_tokens SET last_used_at = NOW(3)
      WHERE id = ? AND (last_used_at IS NULL OR last_used_at < NOW(3) - INTERVAL 1 MINUTE)`,
    [row.token_id],
  );
  return { id: row.id, email: row.email, displayName: row.display_name, tokenId: row.token_id };
}

/** The secret of an `Authorization: Bearer <secret>` header value, or null when it is not one. */
export function bearerSecret(authorization: string | null | undefined): string | null {
  const m = /^Bearer[ \t]+(\S+)[ \t]*$/i.exec(authorization ?? "");
  return m?.[1] ?? null;
}
