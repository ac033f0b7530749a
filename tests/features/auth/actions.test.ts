import assert from "node:assert/strict";
import { describe, expect, test } from "vitest";
import { signIn, signOut, signUp } from "@/features/auth/server/actions";
import { getCurrentSession, listMemberships } from "@/lib/auth/session";
import { THROTTLE_EMAIL_LIMIT } from "@/lib/auth/throttle";
import { db } from "@/lib/db/knex";
import { createUser, uniqueEmail } from "@/tests/support/db";
import { FakeClient, formData } from "@/tests/support/next";

const SESSION = "gloaming_session";

describe("sign up", () => {
  test("creates the person, a new group where they are lead, and a session", async () => {
    const email = uniqueEmail("newcomer");
    const client = new FakeClient();
    const outcome = await client.run(() =>
      signUp(undefined, formData({ email: `  ${email.toUpperCase()} `, password: "a-long-password", displayName: "New Person", groupName: "Canopy Lab (test)" })),
    );
    expect(outcome).toEqual({ kind: "redirect", location: "/sites" });

    const user = await db("users").where({ email }).first();
    assert(user);
    expect(user).toMatchObject({ email, display_name: "New Person" });
    expect(user.password_hash).toMatch(/^\$argon2id\$/);
    expect(await listMemberships(user.id)).toEqual([{ groupId: expect.any(Number), groupName: "Canopy Lab (test)", role: "lead" }]);

    const session = await client.call(() => getCurrentSession());
    expect(session?.user.email).toBe(email);
    expect(await db("audit_log").where({ user_id: user.id }).pluck("action")).toEqual(
      expect.arrayContaining(["user.sign_up", "group.create"]),
    );
  });

  test("rejects a short password and a taken address with messages per field", async () => {
    const short = await new FakeClient().call(() =>
      signUp(undefined, formData({ email: "not-an-address", password: "short", displayName: "", groupName: "G" })),
    );
    expect(short.ok).toBe(false);
    expect(short.fieldErrors?.password).toEqual(["Use at least 10 characters."]);
    expect(short.fieldErrors?.email).toEqual(["Enter a valid e-mail address."]);
    expect(short.fieldErrors?.displayName).toEqual(["Enter your name."]);

    const existing = await createUser();
    const taken = await new FakeClient().call(() =>
      signUp(undefined, formData({ email: existing.email, password: "a-long-password", displayName: "X", groupName: "G" })),
    );
    expect(taken.fieldErrors?.email?.[0]).toMatch(/already exists/);
  });
});

describe("sign in and sign out", () => {
  test("the right password signs in with an HttpOnly, SameSite=Lax cookie; sign out ends the session", async () => {
    const user = await createUser();
    const client = new FakeClient({ ip: "198.51.100.1" });
    const outcome = await client.run(() => signIn(undefined, formData({ email: user.email, password: user.password })));
    expect(outcome).toEqual({ kind: "redirect", location: "/sites" });

    const cookie = client.cookies.lastWritten(SESSION);
    expect(cookie).toMatchObject({ httpOnly: true, sameSite: "lax", path: "/" });
    // APP_URL is http in tests, so the cookie must not be Secure (it would never be sent back).
    expect(cookie?.secure).toBe(false);
    expect(cookie?.maxAge).toBeGreaterThan(0);
    const sessionId = cookie?.value ?? "";
    expect(await db("user_sessions").where({ id: sessionId, user_id: user.id }).first()).toBeDefined();

    expect(await client.run(() => signOut())).toEqual({ kind: "redirect", location: "/sign-in" });
    expect(client.cookies.get(SESSION)).toBeUndefined();
    expect(await db("user_sessions").where({ id: sessionId }).first()).toBeUndefined();
    expect(await client.call(() => getCurrentSession())).toBeNull();
  });

  test("a wrong password or unknown address gives one neutral message and no session", async () => {
    const user = await createUser();
    const client = new FakeClient({ ip: "198.51.100.2" });
    const wrong = await client.call(() => signIn(undefined, formData({ email: user.email, password: "wrong-password" })));
    const unknown = await client.call(() => signIn(undefined, formData({ email: uniqueEmail(), password: "whatever-it-is" })));
    expect(wrong).toEqual({ ok: false, message: "The e-mail address or the password is not right." });
    expect(unknown).toEqual(wrong);
    expect(client.cookies.get(SESSION)).toBeUndefined();
  });

  test("missing fields come back per field", async () => {
    const r = await new FakeClient().call(() => signIn(undefined, formData({ email: "", password: "" })));
    expect(r.ok).toBe(false);
    expect(r.fieldErrors?.password).toEqual(["Enter your password."]);
    expect(r.fieldErrors?.email).toBeDefined();
  });
});

describe("throttling", () => {
  test(`after ${THROTTLE_EMAIL_LIMIT} failures even the right password is refused with a clear message`, async () => {
    const user = await createUser();
    const client = new FakeClient({ ip: "198.51.100.3" });
    for (let i = 0; i < THROTTLE_EMAIL_LIMIT; i++) {
      const r = await client.call(() => signIn(undefined, formData({ email: user.email, password: `wrong-${i}` })));
      expect(r.message).toBe("The e-mail address or the password is not right.");
    }
    const refused = await client.run(() => signIn(undefined, formData({ email: user.email, password: user.password })));
    expect(refused).toEqual({
      kind: "value",
      value: { ok: false, message: "Too many failed sign-ins. Try again in 15 minutes." },
    });
    expect(client.cookies.get(SESSION)).toBeUndefined();

    // Another address from the same client is not affected by this address's lock.
    const other = await createUser();
    expect(await client.run(() => signIn(undefined, formData({ email: other.email, password: other.password })))).toEqual({
      kind: "redirect",
      location: "/sites",
    });
  });

  test("a success before the limit resets the count for that address", async () => {
    const user = await createUser();
    const client = new FakeClient({ ip: "198.51.100.4" });
    for (let i = 0; i < THROTTLE_EMAIL_LIMIT - 1; i++) {
      await client.call(() => signIn(undefined, formData({ email: user.email, password: "wrong-password" })));
    }
    expect((await client.run(() => signIn(undefined, formData({ email: user.email, password: user.password })))).kind).toBe("redirect");
    for (let i = 0; i < THROTTLE_EMAIL_LIMIT - 1; i++) {
      await client.call(() => signIn(undefined, formData({ email: user.email, password: "wrong-password" })));
    }
    expect((await client.run(() => signIn(undefined, formData({ email: user.email, password: user.password })))).kind).toBe("redirect");
  });
});

describe("throttling by client address", () => {
  test("20 failures from one address lock that address for every account", async () => {
    const ip = "198.51.100.99";
    const client = new FakeClient({ ip });
    for (let i = 0; i < 20; i++) {
      await client.call(() => signIn(undefined, formData({ email: uniqueEmail("guess"), password: "wrong-password" })));
    }
    const user = await createUser();
    const r = await client.call(() => signIn(undefined, formData({ email: user.email, password: user.password })));
    expect(r.message).toMatch(/^Too many failed sign-ins\. Try again in \d+ minutes?\.$/);
    // The same account from elsewhere still signs in.
    const elsewhere = new FakeClient({ ip: "198.51.100.100" });
    expect((await elsewhere.run(() => signIn(undefined, formData({ email: user.email, password: user.password })))).kind).toBe(
      "redirect",
    );
  });
});
