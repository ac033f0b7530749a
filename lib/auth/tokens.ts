import "server-only";
import { randomBytes } from "node:crypto";
import { lucia } from "@/lib/auth/lucia";
import { isRole, roleAtLeast, type Role } from "@/lib/auth/roles";
import { AuthError, assertSameOrigin, type SessionUser } from "@/lib/auth/session";
import { TOKEN_PREFIX, bearerSecret, hashTokenSecret, userForTokenSecret } from "@/lib/auth/token-store";
import { db } from "@/lib/db/knex";

/*
 * Personal API tokens for scripts (uploads from tower computers). The secret is shown once at
 * creation; only its SHA-256 is stored. A token acts as its owner, with the owner's roles.
 */

export { TOKEN_PREFIX, hashTokenSecret } from "@/lib/auth/token-store";

/** Live tokens one person may hold at once. */
export const MAX_ACTIVE_TOKENS = 20;

export interface ApiTokenInfo {
  id: number;
  name: string;
  createdAt: Date;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
}

export class TokenError extends Error {
  constructor(
    readonly code: "invalid_name" | "too_many" | "unknown_user",
    message: string,
  ) {
    super(message);
    this.name = "TokenError";
  }
}

/**
 * Creates a token for `userId` labelled `name` (1-80 characters) and returns its secret, which
 * is not stored and cannot be shown again.
 */
export async function createApiToken(userId: string, name: string): Promise<{ id: number; name: string; secret: string }> {
  const label = name.trim();
  if (label.length < 1 || label.length > 80) throw new TokenError("invalid_name", "Give the token a name of 1 to 80 characters.");
  const secret = TOKEN_PREFIX + randomBytes(32).toString("base64url");
  const id = await db.transaction(async (trx) => {
    const [users] = (await trx.raw("SELECT id FROM users WHERE id = ? FOR UPDATE", [userId])) as [Array<{ id: string }>];
    if (!users[0]) throw new TokenError("unknown_user", "No such account.");
    const [live] = (await trx.raw("SELECT COUNT(*) AS n FROM api_tokens WHERE user_id = ? AND revoked_at IS NULL", [userId])) as [
      Array<{ n: number | string }>,
    ];
    if (Number(live[0]?.n ?? 0) >= MAX_ACTIVE_TOKENS)
      throw new TokenError("too_many", `You already have ${MAX_ACTIVE_TOKENS} tokens. Revoke one you no longer use first.`);
    const [newId] = await trx("api_tokens").insert({ user_id: userId, name: label, token_hash: hashTokenSecret(secret) });
    return Number(newId);
  });
  return { id, name: label, secret };
}

/** A person's tokens, newest first (revoked ones included, marked). */
export async function listApiTokens(userId: string): Promise<ApiTokenInfo[]> {
  const [rows] = (await db.raw(
    "SELECT id, name, created_at, last_used_at, revoked_at FROM api_tokens WHERE user_id = ? ORDER BY created_at DESC, id DESC",
    [userId],
  )) as [Array<{ id: number; name: string; created_at: Date; last_used_at: Date | null; revoked_at: Date | null }>];
  return rows.map((r) => ({ id: r.id, name: r.name, createdAt: r.created_at, lastUsedAt: r.last_used_at, revokedAt: r.revoked_at }));
}

/** Revokes one of the person's own tokens. False when there is no such live token of theirs. */
export async function revokeApiToken(userId: string, tokenId: number): Promise<boolean> {
  const [res] = (await db.raw("UPDATE api_tokens SET revoked_at = NOW(3) WHERE id = ? AND user_id = ? AND revoked_at IS NULL", [
    tokenId,
    userId,
  ])) as [{ affectedRows: number }];
  return res.affectedRows > 0;
}

export type RequestUser = { user: SessionUser; via: "session" | "token"; tokenId?: number };

/**
 * Who sent `request`: a person with a session cookie, or a script with
 * `Authorization: Bearer <token>`. A request that carries a bearer header is judged by the
 * token alone (a bad token is refused even when a cookie is present). Null when neither holds.
 */
export async function authenticateRequest(request: Request): Promise<RequestUser | null> {
  const authorization = request.headers.get("authorization");
  // Only the Bearer scheme is ours; e.g. a proxy's Basic credentials leave the cookie in charge.
  if (authorization !== null && /^bearer\b/i.test(authorization)) {
    const secret = bearerSecret(authorization);
    const found = secret ? await userForTokenSecret(secret) : null;
    if (!found) return null;
    const { tokenId, ...user } = found;
    return { user, via: "token", tokenId };
  }
  const sessionId = lucia.readSessionCookie(request.headers.get("cookie") ?? "");
  if (!sessionId) return null;
  assertSameOrigin(request.headers);
  const { session, user } = await lucia.validateSession(sessionId);
  if (!session) return null;
  return { user: { id: user.id, email: user.email, displayName: user.displayName }, via: "session" };
}

/**
 * Route-handler guard: the request's person (session or token) and their role in `groupId`.
 * AuthError "unauthenticated" without credentials, "not_found" outside the group (its
 * existence stays hidden), "forbidden" below `minimum` - the same answers as requireRole.
 */
export async function requireRequestRole(request: Request, groupId: number, minimum: Role): Promise<RequestUser & { role: Role }> {
  const who = await authenticateRequest(request);
  if (!who) throw new AuthError("unauthenticated");
  const [rows] = (await db.raw("SELECT role FROM memberships WHERE user_id = ? AND group_id = ?", [who.user.id, groupId])) as [
    Array<{ role: string }>,
  ];
  const role = rows[0]?.role;
  if (role === undefined || !isRole(role)) throw new AuthError("not_found");
  if (!roleAtLeast(role, minimum)) throw new AuthError("forbidden");
  return { ...who, role };
}
