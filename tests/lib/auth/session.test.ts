import { describe, expect, test } from "vitest";
import {
  getActiveGroup,
  getCurrentSession,
  listMemberships,
  requestCaller,
  requireRole,
  requireSession,
  setActiveGroup,
} from "@/lib/auth/session";
import { createApiToken, revokeApiToken } from "@/lib/auth/tokens";
import { addMember, clientFor, createGroup, createUser, createUserWithGroup } from "@/tests/support/db";
import { FakeClient } from "@/tests/support/next";

describe("requireSession", () => {
  test("without a cookie it refuses as unauthenticated", async () => {
    const anon = new FakeClient();
    await expect(anon.run(() => requireSession())).rejects.toMatchObject({ code: "unauthenticated" });
    expect(await anon.call(() => getCurrentSession())).toBeNull();
  });

  test("with a forged cookie it refuses and clears the cookie", async () => {
    const client = new FakeClient({ cookies: { gloaming_session: "not-a-session" } });
    await expect(client.run(() => requireSession())).rejects.toMatchObject({ code: "unauthenticated" });
    expect(client.cookies.get("gloaming_session")).toBeUndefined();
  });

  test("with a valid session it returns the person", async () => {
    const user = await createUser({ displayName: "Ada Example" });
    const client = await clientFor(user);
    const s = await client.call(() => requireSession());
    expect(s.user).toEqual({ id: user.id, email: user.email, displayName: "Ada Example" });
  });
});

describe("requestCaller", () => {
  const url = "http://localhost/api/jobs/1";
  const other = "https://tower-data.invalid"; // RFC 6761 reserved name: never a real site

  test("a bearer token on the Request is judged alone: it wins over the cookie, and a bad one is 401 beside a valid cookie", async () => {
    const cookieOwner = await createUser();
    const scriptOwner = await createUser();
    const { id, secret } = await createApiToken(scriptOwner.id, "tower computer");
    const browser = await clientFor(cookieOwner);
    const withToken = (value: string) => new Request(url, { headers: { authorization: value } });

    const byToken = await browser.call(() => requestCaller(withToken(`Bearer ${secret}`)));
    expect(byToken).toEqual({
      user: expect.objectContaining({ id: scriptOwner.id }),
      sessionId: `token:${id}`,
    });
    await expect(browser.run(() => requestCaller(withToken("Bearer not-a-token")))).rejects.toMatchObject({
      name: "AuthError",
      code: "unauthenticated",
    });
    await revokeApiToken(scriptOwner.id, id);
    await expect(browser.run(() => requestCaller(withToken(`Bearer ${secret}`)))).rejects.toMatchObject({
      code: "unauthenticated",
    });
  });

  test("without a bearer header the session of the scope answers (a proxy's Basic credentials leave it in charge)", async () => {
    const user = await createUser();
    const browser = await clientFor(user);
    const basic = new Request(url, {
      headers: { authorization: `Basic ${Buffer.from("proxy:pw").toString("base64")}` },
    });
    expect((await browser.call(() => requestCaller(basic))).user.id).toBe(user.id);
    expect((await browser.call(() => requestCaller(new Request(url)))).user.id).toBe(user.id);
    expect((await browser.call(() => requestCaller())).user.id).toBe(user.id);
  });

  test("a cookie sent with another site's Origin is refused; a bearer token from there is not", async () => {
    const user = await createUser();
    const { secret } = await createApiToken(user.id, "origin check");
    const crossSite = await clientFor(user);
    crossSite.headers.set("origin", other);
    await expect(
      crossSite.run(() => requestCaller(new Request(url, { headers: { origin: other } }))),
    ).rejects.toMatchObject({
      name: "CrossOriginError",
    });
    const script = new Request(url, { headers: { origin: other, authorization: `Bearer ${secret}` } });
    expect(
      (await new FakeClient({ headers: { origin: other } }).call(() => requestCaller(script))).user.id,
    ).toBe(user.id);
  });

  test("nobody at all is unauthenticated, with or without a Request", async () => {
    const anon = new FakeClient();
    await expect(anon.run(() => requestCaller())).rejects.toMatchObject({
      name: "AuthError",
      code: "unauthenticated",
    });
    await expect(anon.run(() => requestCaller(new Request(url)))).rejects.toMatchObject({
      code: "unauthenticated",
    });
  });
});

describe("requireRole", () => {
  test("a person outside the group gets not_found, never forbidden", async () => {
    const { group } = await createUserWithGroup({ role: "lead" });
    const outsider = await createUser();
    const client = await clientFor(outsider);
    await expect(client.run(() => requireRole(group.id, "viewer"))).rejects.toMatchObject({ code: "not_found" });
  });

  test("a viewer asking for analyst rights gets forbidden", async () => {
    const { user, group } = await createUserWithGroup({ role: "viewer" });
    const client = await clientFor(user);
    await expect(client.run(() => requireRole(group.id, "analyst"))).rejects.toMatchObject({ code: "forbidden" });
    await expect(client.call(() => requireRole(group.id, "viewer"))).resolves.toMatchObject({ role: "viewer" });
  });

  test("a lead passes every minimum", async () => {
    const { user, group } = await createUserWithGroup({ role: "lead" });
    const client = await clientFor(user);
    for (const min of ["viewer", "analyst", "lead"] as const) {
      const r = await client.call(() => requireRole(group.id, min));
      expect(r).toEqual({ user: expect.objectContaining({ id: user.id }), role: "lead" });
    }
  });

  test("an anonymous caller gets unauthenticated", async () => {
    const { group } = await createUserWithGroup();
    await expect(new FakeClient().run(() => requireRole(group.id, "viewer"))).rejects.toMatchObject({
      code: "unauthenticated",
    });
  });
});

describe("active group", () => {
  test("falls back to the first membership and follows the switcher cookie", async () => {
    const user = await createUser();
    const a = await createGroup("A test group");
    const b = await createGroup("B test group");
    await addMember(user.id, a.id, "viewer");
    await addMember(user.id, b.id, "lead");
    expect((await listMemberships(user.id)).map((m) => m.groupName)).toEqual(["A test group", "B test group"]);

    const client = await clientFor(user);
    expect(await client.call(() => getActiveGroup())).toEqual({ groupId: a.id, groupName: "A test group", role: "viewer" });
    await client.call(() => setActiveGroup(b.id));
    expect(client.cookies.lastWritten("gloaming_group")).toMatchObject({ value: String(b.id), httpOnly: true, sameSite: "lax" });
    expect(await client.call(() => getActiveGroup())).toEqual({ groupId: b.id, groupName: "B test group", role: "lead" });
  });

  test("cannot be set to a group the person is not in", async () => {
    const user = await createUser();
    const { group } = await createUserWithGroup();
    const client = await clientFor(user);
    await expect(client.run(() => setActiveGroup(group.id))).rejects.toMatchObject({ code: "not_found" });
    expect(client.cookies.get("gloaming_group")).toBeUndefined();
  });
});
