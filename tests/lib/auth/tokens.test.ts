import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { lucia } from "@/lib/auth/lucia";
import { getCurrentSession, requireRole } from "@/lib/auth/session";
import {
  MAX_ACTIVE_TOKENS,
  TOKEN_PREFIX,
  authenticateRequest,
  createApiToken,
  listApiTokens,
  requireRequestRole,
  revokeApiToken,
} from "@/lib/auth/tokens";
import { db } from "@/lib/db/knex";
import { FakeClient } from "@/tests/support/next";
import { addMember, createSessionFor, createUser, createUserWithGroup } from "@/tests/support/db";

const bearer = (secret: string, extra: Record<string, string> = {}) =>
  new Request("http://localhost/api/jobs/1", { headers: { authorization: `Bearer ${secret}`, ...extra } });

describe("personal API tokens", () => {
  it("shows the secret once and stores only its SHA-256", async () => {
    const user = await createUser();
    const t = await createApiToken(user.id, "  tower logger  ");
    expect(t.name).toBe("tower logger");
    expect(t.secret.startsWith(TOKEN_PREFIX)).toBe(true);
    expect(t.secret).toMatch(/^glm_[A-Za-z0-9_-]{43}$/); // 32 random bytes, base64url
    const row = (await db("api_tokens").where({ id: t.id }).first()) as Record<string, unknown>;
    expect(row.token_hash).toBe(createHash("sha256").update(t.secret).digest("hex"));
    for (const v of Object.values(row)) expect(String(v)).not.toContain(t.secret.slice(TOKEN_PREFIX.length));
    const listed = await listApiTokens(user.id);
    expect(listed).toEqual([{ id: t.id, name: "tower logger", createdAt: expect.any(Date) as Date, lastUsedAt: null, revokedAt: null }]);
    expect(JSON.stringify(listed)).not.toContain(t.secret);
    const again = await createApiToken(user.id, "second");
    expect(again.secret).not.toBe(t.secret);
  });

  it("accepts a bearer token as its owner and records the use", async () => {
    const user = await createUser();
    const t = await createApiToken(user.id, "nightly upload");
    const who = await authenticateRequest(bearer(t.secret));
    expect(who).toEqual({ user: { id: user.id, email: user.email, displayName: user.displayName }, via: "token", tokenId: t.id });
    expect((await listApiTokens(user.id))[0]?.lastUsedAt).toBeInstanceOf(Date);
  });

  it("refuses a revoked token, an unknown one and a malformed header, even beside a valid cookie", async () => {
    const user = await createUser();
    const t = await createApiToken(user.id, "old laptop");
    expect(await revokeApiToken(user.id, t.id)).toBe(true);
    expect(await revokeApiToken(user.id, t.id)).toBe(false);
    const { cookieName, cookieValue } = await createSessionFor(user.id);
    const cookie = `${cookieName}=${cookieValue}`;
    expect(await authenticateRequest(bearer(t.secret, { cookie }))).toBeNull();
    expect(await authenticateRequest(bearer(`${TOKEN_PREFIX}${"A".repeat(43)}`))).toBeNull();
    expect(await authenticateRequest(bearer("not-a-token"))).toBeNull();
    expect(await authenticateRequest(new Request("http://localhost/", { headers: { authorization: "Bearer" } }))).toBeNull();
    expect((await listApiTokens(user.id))[0]?.revokedAt).toBeInstanceOf(Date);
  });

  it("accepts the session cookie without a bearer header (also beside a proxy's Basic credentials)", async () => {
    const user = await createUser();
    const { cookieName, cookieValue } = await createSessionFor(user.id);
    const cookie = `${cookieName}=${cookieValue}`;
    expect(await authenticateRequest(new Request("http://localhost/", { headers: { cookie } }))).toMatchObject({
      user: { id: user.id },
      via: "session",
    });
    const basic = { cookie, authorization: `Basic ${Buffer.from("proxy:pw").toString("base64")}` };
    expect((await authenticateRequest(new Request("http://localhost/", { headers: basic })))?.via).toBe("session");
    expect(await authenticateRequest(new Request("http://localhost/"))).toBeNull();
    await lucia.invalidateSession(lucia.readSessionCookie(cookie) ?? "");
    expect(await authenticateRequest(new Request("http://localhost/", { headers: { cookie } }))).toBeNull();
  });

  it("lets only the owner revoke a token", async () => {
    const owner = await createUser();
    const other = await createUser();
    const t = await createApiToken(owner.id, "shared by mistake");
    expect(await revokeApiToken(other.id, t.id)).toBe(false);
    expect(await authenticateRequest(bearer(t.secret))).not.toBeNull();
  });

  it("checks the owner's role in the group, with the same answers as the session guard", async () => {
    const { user, group } = await createUserWithGroup({ role: "analyst" });
    const t = await createApiToken(user.id, "script");
    await expect(requireRequestRole(bearer(t.secret), group.id, "analyst")).resolves.toMatchObject({ role: "analyst", via: "token" });
    await expect(requireRequestRole(bearer(t.secret), group.id, "lead")).rejects.toMatchObject({ code: "forbidden" });
    const elsewhere = await createUserWithGroup();
    await expect(requireRequestRole(bearer(t.secret), elsewhere.group.id, "viewer")).rejects.toMatchObject({ code: "not_found" });
    await revokeApiToken(user.id, t.id);
    await expect(requireRequestRole(bearer(t.secret), group.id, "viewer")).rejects.toMatchObject({ code: "unauthenticated" });
  });

  it("works through getCurrentSession, so every route guarded by requireRole accepts tokens", async () => {
    const { user, group } = await createUserWithGroup({ role: "viewer" });
    const t = await createApiToken(user.id, "reader");
    const script = new FakeClient({ headers: { authorization: `Bearer ${t.secret}` } });
    expect(await script.call(() => getCurrentSession())).toEqual({
      user: { id: user.id, email: user.email, displayName: user.displayName },
      sessionId: `token:${t.id}`,
    });
    await expect(script.call(() => requireRole(group.id, "viewer"))).resolves.toMatchObject({ role: "viewer" });
    await expect(script.call(() => requireRole(group.id, "analyst"))).rejects.toMatchObject({ code: "forbidden" });
    await revokeApiToken(user.id, t.id);
    const later = new FakeClient({ headers: { authorization: `Bearer ${t.secret}` } });
    expect(await later.call(() => getCurrentSession())).toBeNull();
  });

  it("refuses empty or over-long names and more than the allowed number of live tokens", async () => {
    const user = await createUser();
    await expect(createApiToken(user.id, "   ")).rejects.toMatchObject({ code: "invalid_name" });
    await expect(createApiToken(user.id, "x".repeat(81))).rejects.toMatchObject({ code: "invalid_name" });
    const made = [];
    for (let i = 0; i < MAX_ACTIVE_TOKENS; i++) made.push(await createApiToken(user.id, `t${i}`));
    await expect(createApiToken(user.id, "one more")).rejects.toMatchObject({ code: "too_many" });
    await revokeApiToken(user.id, made[0]!.id);
    await expect(createApiToken(user.id, "one more")).resolves.toMatchObject({ name: "one more" });
    await expect(createApiToken("no-such-user", "x")).rejects.toMatchObject({ code: "unknown_user" });
  });

  it("a member added later gains access through an existing token", async () => {
    const user = await createUser();
    const t = await createApiToken(user.id, "early");
    const { group } = await createUserWithGroup();
    await expect(requireRequestRole(bearer(t.secret), group.id, "viewer")).rejects.toMatchObject({ code: "not_found" });
    await addMember(user.id, group.id, "viewer");
    await expect(requireRequestRole(bearer(t.secret), group.id, "viewer")).resolves.toMatchObject({ role: "viewer" });
  });
});
