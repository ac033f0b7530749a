import { describe, expect, it } from "vitest";
import { authenticateRequest, createApiToken } from "@/lib/auth/tokens";
import { db } from "@/lib/db/knex";
import { createTokenAction, revokeTokenAction } from "@/features/account/server/actions";
import { tokensOf } from "@/features/account/server/queries";
import { FakeClient, formData } from "@/tests/support/next";
import { clientFor, createUser } from "@/tests/support/db";

const asBearer = (secret: string) => new Request("http://localhost/", { headers: { authorization: `Bearer ${secret}` } });

describe("account token actions", () => {
  it("creates a token, returns its secret once and lists it without the secret", async () => {
    const user = await createUser();
    const browser = await clientFor(user);
    const state = await browser.call(() => createTokenAction({ ok: true }, formData({ name: "north tower logger" })));
    expect(state.ok).toBe(true);
    const secret = state.created?.secret ?? "";
    expect(secret).toMatch(/^glm_/);
    expect((await authenticateRequest(asBearer(secret)))?.user.id).toBe(user.id);
    const listed = await tokensOf(user.id);
    expect(listed).toEqual([{ id: state.created?.id, name: "north tower logger", createdAt: expect.any(String) as string, lastUsedAt: expect.any(String) as string, revokedAt: null }]);
    expect(JSON.stringify(listed)).not.toContain(secret);
    const audit = await db("audit_log").where({ user_id: user.id, action: "token.create" }).first();
    expect(JSON.stringify(audit)).not.toContain(secret);
  });

  it("answers a missing name beside the field", async () => {
    const browser = await clientFor(await createUser());
    const state = await browser.call(() => createTokenAction({ ok: true }, formData({ name: "  " })));
    expect(state.ok).toBe(false);
    expect(state.fieldErrors?.name?.[0]).toMatch(/Name the token/);
  });

  it("revokes a token so scripts using it are refused", async () => {
    const user = await createUser();
    const t = await createApiToken(user.id, "old");
    const browser = await clientFor(user);
    expect(await browser.call(() => revokeTokenAction({ ok: true }, formData({ tokenId: t.id })))).toEqual({ ok: true, message: "Token revoked." });
    expect(await authenticateRequest(asBearer(t.secret))).toBeNull();
    const again = await browser.call(() => revokeTokenAction({ ok: true }, formData({ tokenId: t.id })));
    expect(again.ok).toBe(false);
  });

  it("does not let a token create or revoke tokens, nor someone else revoke yours", async () => {
    const user = await createUser();
    const t = await createApiToken(user.id, "script");
    const script = new FakeClient({ headers: { authorization: `Bearer ${t.secret}` } });
    expect((await script.call(() => createTokenAction({ ok: true }, formData({ name: "more" })))).ok).toBe(false);
    expect((await script.call(() => revokeTokenAction({ ok: true }, formData({ tokenId: t.id })))).ok).toBe(false);
    const stranger = await clientFor(await createUser());
    expect((await stranger.call(() => revokeTokenAction({ ok: true }, formData({ tokenId: t.id })))).ok).toBe(false);
    expect(await authenticateRequest(asBearer(t.secret))).not.toBeNull();
  });

  it("sends a visitor without a session to sign in", async () => {
    const outcome = await new FakeClient().run(() => createTokenAction({ ok: true }, formData({ name: "x" })));
    expect(outcome).toEqual({ kind: "redirect", location: "/sign-in" });
  });
});
