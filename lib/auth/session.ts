import "server-only";
import { cookies, headers } from "next/headers";
import { cache } from "react";
import { lucia } from "@/lib/auth/lucia";
import { isRole, roleAtLeast, type Role } from "@/lib/auth/roles";
import { bearerSecret, userForTokenSecret } from "@/lib/auth/token-store";
import { db } from "@/lib/db/knex";
import { env } from "@/lib/env";

export type SessionUser = { id: string; email: string; displayName: string };
export type CurrentSession = { user: SessionUser; sessionId: string };
export type Membership = { groupId: number; groupName: string; role: Role };

export type AuthErrorCode = "unauthenticated" | "forbidden" | "not_found";

/** Thrown by the guards; pages redirect or call notFound(), route handlers map it to 401/403/404. */
export class AuthError extends Error {
  readonly code: AuthErrorCode;
  constructor(code: AuthErrorCode, message?: string) {
    super(message ?? defaultMessages[code]);
    this.name = "AuthError";
    this.code = code;
  }
}

const defaultMessages: Record<AuthErrorCode, string> = {
  unauthenticated: "Sign in to continue.",
  forbidden: "Your role in this group does not allow that.",
  not_found: "Not found.",
};

/**
 * A cookie-authenticated request sent from another site (its Origin is neither APP_URL nor the
 * Host it was sent to). Route handlers answer 403; the cookie alone must not let another page
 * change data on a person's behalf.
 */
export class CrossOriginError extends Error {
  constructor(readonly origin: string) {
    super(
      `Refused: this request came from another site (Origin ${origin.slice(0, 100)}). Use the app itself, or send an API token (Authorization: Bearer) from scripts.`,
    );
    this.name = "CrossOriginError";
  }
}

/**
 * Whether a request's Origin header may ride on the session cookie: absent (same-origin
 * navigation, non-browser clients), the origin of APP_URL, or the same host the request was
 * sent to. "null" (sandboxed frames, some redirects) is refused.
 */
export function originAllowed(origin: string | null, host: string | null): boolean {
  if (origin === null) return true;
  let parsed: URL;
  try {
    parsed = new URL(origin);
  } catch {
    return false;
  }
  if (parsed.origin === new URL(env.APP_URL).origin) return true;
  return host !== null && parsed.host === host.trim().toLowerCase();
}

/** Throws CrossOriginError when a cookie-carrying request's Origin is another site's. */
export function assertSameOrigin(requestHeaders: Headers): void {
  const origin = requestHeaders.get("origin");
  if (!originAllowed(origin, requestHeaders.get("host"))) throw new CrossOriginError(origin ?? "");
}

/** Name of the cookie holding the id of the group the person is working in. */
export const ACTIVE_GROUP_COOKIE = "gloaming_group";

type CookieAttrs = { httpOnly?: boolean; sameSite?: "lax" | "strict" | "none"; secure?: boolean; path?: string; maxAge?: number; expires?: Date };

// Server components may not write cookies; the refreshed cookie is then written by the next action.
async function trySetCookie(name: string, value: string, attributes: CookieAttrs): Promise<void> {
  try {
    (await cookies()).set(name, value, attributes);
  } catch {
    /* read-only cookie store (server component render) */
  }
}

// Only the Bearer scheme is ours; other schemes (a proxy's Basic credentials) leave the cookie in charge.
function isBearer(authorization: string | null): authorization is string {
  return authorization !== null && /^bearer\b/i.test(authorization);
}

// A bearer header is judged by its token alone: a bad or revoked token is nobody, whatever cookie came with it.
async function tokenSession(authorization: string): Promise<CurrentSession | null> {
  const secret = bearerSecret(authorization);
  const found = secret ? await userForTokenSecret(secret) : null;
  if (!found) return null;
  return { user: { id: found.id, email: found.email, displayName: found.displayName }, sessionId: `token:${found.tokenId}` };
}

/**
 * The signed-in person of this request, or null. Cached per request. A request with
 * `Authorization: Bearer <token>` (scripts) is judged by its personal API token alone; its
 * sessionId is then "token:<id>". A cookie sent with another site's Origin throws
 * CrossOriginError (bearer requests are exempt: no browser attaches a token by itself).
 */
export const getCurrentSession = cache(async (): Promise<CurrentSession | null> => {
  const authorization = (await headers()).get("authorization");
  if (isBearer(authorization)) return tokenSession(authorization);
  const sessionId = (await cookies()).get(lucia.sessionCookieName)?.value;
  if (!sessionId) return null;
  assertSameOrigin(await headers());
  const { session, user } = await lucia.validateSession(sessionId);
  if (!session) {
    const blank = lucia.createBlankSessionCookie();
    await trySetCookie(blank.name, blank.value, blank.attributes);
    return null;
  }
  if (session.fresh) {
    const c = lucia.createSessionCookie(session.id);
    await trySetCookie(c.name, c.value, c.attributes);
  }
  return { user: { id: user.id, email: user.email, displayName: user.displayName }, sessionId: session.id };
});

/** The signed-in person; throws AuthError("unauthenticated") when there is none. */
export async function requireSession(): Promise<CurrentSession> {
  return requestCaller();
}

/**
 * Who is asking, for route handlers, actions and pages: the person of `request`'s
 * `Authorization: Bearer` token when it carries one (judged by the token alone, so an invalid
 * token is refused even beside a valid cookie), else the session of this request scope as
 * getCurrentSession() reads it (a cookie with another site's Origin throws CrossOriginError).
 * In a Next route handler the Request and next/headers carry the same headers; the Request is
 * read as well because in-process callers (tests, scripts) may hand over a Request whose
 * headers the surrounding scope does not have. Throws AuthError("unauthenticated") when nobody
 * is identified.
 */
export async function requestCaller(request?: Request): Promise<CurrentSession> {
  const authorization = request?.headers.get("authorization") ?? null;
  const current = isBearer(authorization) ? await tokenSession(authorization) : await getCurrentSession();
  if (!current) throw new AuthError("unauthenticated");
  return current;
}

/** The groups a person belongs to, by group name. */
export async function listMemberships(userId: string): Promise<Membership[]> {
  const rows = await db("memberships as m")
    .join("research_groups as g", "g.id", "m.group_id")
    .where("m.user_id", userId)
    .orderBy([{ column: "g.name" }, { column: "g.id" }])
    .select<Array<{ groupId: number; groupName: string; role: string }>>({
      groupId: "g.id",
      groupName: "g.name",
      role: "m.role",
    });
  return rows.filter((r): r is Membership => isRole(r.role));
}

/**
 * Guard for everything group-scoped. A person outside the group gets "not_found" (the group's
 * existence stays hidden); a member below `minimum` gets "forbidden".
 */
export async function requireRole(groupId: number, minimum: Role): Promise<{ user: SessionUser; role: Role }> {
  const { user } = await requireSession();
  const row = await db("memberships").where({ user_id: user.id, group_id: groupId }).first("role");
  if (!row || !isRole(row.role)) throw new AuthError("not_found");
  if (!roleAtLeast(row.role, minimum)) throw new AuthError("forbidden");
  return { user, role: row.role };
}

/** The group chosen with the group switcher, else the person's first group; null without a session or groups. */
export async function getActiveGroup(): Promise<Membership | null> {
  const current = await getCurrentSession();
  if (!current) return null;
  const memberships = await listMemberships(current.user.id);
  const chosen = Number((await cookies()).get(ACTIVE_GROUP_COOKIE)?.value);
  return memberships.find((m) => m.groupId === chosen) ?? memberships[0] ?? null;
}

/** Writes the active-group cookie without checks; callers have verified the membership. */
export async function writeActiveGroupCookie(groupId: number): Promise<void> {
  (await cookies()).set(ACTIVE_GROUP_COOKIE, String(groupId), {
    httpOnly: true,
    sameSite: "lax",
    secure: env.SESSION_SECURE,
    path: "/",
    maxAge: 60 * 60 * 24 * 365,
  });
}

/** Makes `groupId` the active group after checking membership (AuthError "not_found" otherwise). */
export async function setActiveGroup(groupId: number): Promise<Membership> {
  const { role } = await requireRole(groupId, "viewer");
  const group = await db("research_groups").where({ id: groupId }).first("name");
  if (!group) throw new AuthError("not_found");
  await writeActiveGroupCookie(groupId);
  return { groupId, groupName: group.name, role };
}

/**
 * Starts a session for `userId` and sets the session cookie (actions and route handlers only).
 * A session cookie the browser already carried is invalidated first: the id after sign-in is
 * always new, so a planted or stale id never becomes a signed-in one.
 */
export async function startSession(userId: string): Promise<string> {
  const previous = (await cookies()).get(lucia.sessionCookieName)?.value;
  if (previous) await lucia.invalidateSession(previous);
  const session = await lucia.createSession(userId, {});
  const c = lucia.createSessionCookie(session.id);
  (await cookies()).set(c.name, c.value, c.attributes);
  return session.id;
}

/** Ends the current session (if any) and clears the session and group cookies. */
export async function endSession(): Promise<void> {
  const jar = await cookies();
  const sessionId = jar.get(lucia.sessionCookieName)?.value;
  if (sessionId) await lucia.invalidateSession(sessionId);
  const blank = lucia.createBlankSessionCookie();
  jar.set(blank.name, blank.value, blank.attributes);
  jar.delete(ACTIVE_GROUP_COOKIE);
}
