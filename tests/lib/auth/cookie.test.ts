import { afterEach, describe, expect, test, vi } from "vitest";

// The env module is read once at import, so each case imports a fresh copy.
async function sessionCookieFor(appUrl: string) {
  vi.resetModules();
  vi.stubEnv("APP_URL", appUrl);
  const { lucia } = await import("@/lib/auth/lucia");
  return lucia.createSessionCookie("example-session-id");
}

afterEach(() => {
  vi.unstubAllEnvs();
  vi.resetModules();
});

describe("session cookie attributes", () => {
  test("served over https the cookie is Secure, HttpOnly and SameSite=Lax", async () => {
    const c = await sessionCookieFor("https://gloaming.example.test");
    expect(c.attributes).toMatchObject({ secure: true, httpOnly: true, sameSite: "lax", path: "/" });
    expect(c.serialize()).toMatch(/; HttpOnly/);
    expect(c.serialize()).toMatch(/; Secure/);
  });

  test("served over plain http (local development) it is not Secure", async () => {
    const c = await sessionCookieFor("http://localhost:3000");
    expect(c.attributes).toMatchObject({ secure: false, httpOnly: true, sameSite: "lax" });
  });
});
