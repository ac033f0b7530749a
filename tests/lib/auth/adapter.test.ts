import { describe, expect, test } from "vitest";
import { lucia } from "@/lib/auth/lucia";
import { db } from "@/lib/db/knex";
import { createSessionFor, createUser } from "@/tests/support/db";

// lib/auth/lucia.ts reads a session and its person in one query; lucia's own rules on top of it
// (expiry, extension past half-life) must behave as with the stock adapter.
describe("session check in one query", () => {
  test("a live session gives its person with the attributes the app uses", async () => {
    const user = await createUser({ displayName: "Uma Example" });
    const { sessionId } = await createSessionFor(user.id);
    const { session, user: found } = await lucia.validateSession(sessionId);
    expect(session).toMatchObject({ id: sessionId, userId: user.id, fresh: false });
    expect(session?.expiresAt).toBeInstanceOf(Date);
    expect(found).toEqual({ id: user.id, email: user.email, displayName: "Uma Example" });
  });

  test("an unknown id gives nobody", async () => {
    expect(await lucia.validateSession("no-such-session-id")).toEqual({ session: null, user: null });
  });

  test("an expired session gives nobody and is deleted", async () => {
    const user = await createUser();
    const { sessionId } = await createSessionFor(user.id);
    await db("user_sessions").where({ id: sessionId }).update({ expires_at: new Date(Date.now() - 60_000) });
    expect((await lucia.validateSession(sessionId)).session).toBeNull();
    expect(await db("user_sessions").where({ id: sessionId }).first()).toBeUndefined();
  });

  test("a session past half its life is extended and marked fresh", async () => {
    const user = await createUser();
    const { sessionId } = await createSessionFor(user.id);
    const soon = new Date(Date.now() + 2 * 24 * 3600_000); // 2 of 30 days left
    await db("user_sessions").where({ id: sessionId }).update({ expires_at: soon });
    const { session } = await lucia.validateSession(sessionId);
    expect(session?.fresh).toBe(true);
    expect(session!.expiresAt.getTime()).toBeGreaterThan(Date.now() + 29 * 24 * 3600_000);
    const row = await db("user_sessions").where({ id: sessionId }).first<{ expires_at: Date }>("expires_at");
    expect(row?.expires_at.getTime()).toBe(session?.expiresAt.getTime());
  });
});
