import { describe, expect, test, vi } from "vitest";
import { GET as listSitesGET, POST as createSitePOST } from "@/app/api/sites/route";
import { POST as uploadPOST } from "@/app/api/sites/[siteId]/imports/route";
import { signIn, signOut } from "@/features/auth/server/actions";
import * as siteQueries from "@/features/sites/server/queries";
import { lucia } from "@/lib/auth/lucia";
import { requireSession } from "@/lib/auth/session";
import { authenticateRequest, createApiToken } from "@/lib/auth/tokens";
import { db } from "@/lib/db/knex";
import { env } from "@/lib/env";
import { JSON_BODY_LIMIT, readJson } from "@/lib/http/respond";
import { receiveUpload } from "@/features/imports/server/upload";
import {
  clientFor,
  createSessionFor,
  createSiteFor,
  createUser,
  createUserWithGroup,
  uniqueTag,
} from "@/tests/support/db";
import { FakeClient, formData } from "@/tests/support/next";
import { syntheticSiteFields } from "@/tests/support/sites";

/*
 * Web security of the request path: the Origin check on cookie-authenticated requests, early
 * refusal of oversized bodies, session ids at sign-in and sign-out, and error answers that
 * carry no stack traces or database messages. All rows are synthetic fixtures.
 */

// Route handlers call listSites through this mock, so one test can make the database fail.
vi.mock("@/features/sites/server/queries", async (importOriginal) => {
  const real = await importOriginal<typeof siteQueries>();
  return { ...real, listSites: vi.fn(real.listSites) };
});

const APP_ORIGIN = new URL(env.APP_URL).origin;
const EVIL = "https://tower-data.invalid"; // RFC 6761 reserved name: never a real site

const siteBody = (groupId: number) => ({ groupId, ...syntheticSiteFields(`Origin site ${uniqueTag()}`) });

const post = (path: string, body: unknown, headers: Record<string, string> = {}) =>
  new Request(`${APP_ORIGIN}${path}`, {
    method: "POST",
    body: JSON.stringify(body),
    headers: { "content-type": "application/json", ...headers },
  });

type ErrorJson = { error?: { code?: string; message?: string } };

async function lead() {
  const { user, group } = await createUserWithGroup({ role: "lead" });
  return { user, group, client: await clientFor(user, { groupId: group.id }) };
}

describe("Origin check on cookie-authenticated requests", () => {
  test("a session cookie sent from another site is refused with 403 and a clear message; nothing is created", async () => {
    const { group, client } = await lead();
    client.headers.set("origin", EVIL);
    client.headers.set("host", "localhost:3000");
    const body = siteBody(group.id);
    const res = await client.call(() => createSitePOST(post("/api/sites", body, { origin: EVIL })));
    expect(res.status).toBe(403);
    const json = (await res.json()) as ErrorJson;
    expect(json.error?.code).toBe("cross_origin");
    expect(json.error?.message).toContain("another site");
    expect(json.error?.message).toContain(EVIL);
    expect(await db("sites").where({ name: body.name }).first()).toBeUndefined();
  });

  test("Origin equal to APP_URL, or to the Host the request was sent to, passes", async () => {
    const { group, client } = await lead();
    client.headers.set("origin", APP_ORIGIN);
    const viaAppUrl = await client.call(() => createSitePOST(post("/api/sites", siteBody(group.id))));
    expect(viaAppUrl.status).toBe(201);

    const other = await lead();
    other.client.headers.set("origin", "http://10.0.0.7:8080");
    other.client.headers.set("host", "10.0.0.7:8080");
    const viaHost = await other.client.call(() =>
      createSitePOST(post("/api/sites", siteBody(other.group.id))),
    );
    expect(viaHost.status).toBe(201);
  });

  test('Origin "null" (sandboxed frame) with a cookie is refused', async () => {
    const { client } = await lead();
    client.headers.set("origin", "null");
    await expect(client.call(() => requireSession())).rejects.toMatchObject({ name: "CrossOriginError" });
  });

  test("no Origin header (same-origin navigation, curl with a cookie) passes", async () => {
    const { client } = await lead();
    const res = await client.call(() => listSitesGET(new Request(`${APP_ORIGIN}/api/sites`)));
    expect(res.status).toBe(200);
  });

  test("Bearer-token requests are exempt: no browser attaches a token by itself", async () => {
    const { user, group } = await createUserWithGroup({ role: "lead" });
    const { secret } = await createApiToken(user.id, "origin test");
    const script = new FakeClient({ headers: { authorization: `Bearer ${secret}`, origin: EVIL } });
    const res = await script.call(() =>
      createSitePOST(
        post("/api/sites", siteBody(group.id), { authorization: `Bearer ${secret}`, origin: EVIL }),
      ),
    );
    expect(res.status).toBe(201);
  });

  test("authenticateRequest (cookie read from the request itself) applies the same check", async () => {
    const user = await createUser();
    const { cookieName, cookieValue } = await createSessionFor(user.id);
    const cookie = `${cookieName}=${cookieValue}`;
    const same = await authenticateRequest(
      new Request(`${APP_ORIGIN}/x`, { headers: { cookie, origin: APP_ORIGIN } }),
    );
    expect(same?.user.id).toBe(user.id);
    await expect(
      authenticateRequest(
        new Request(`${APP_ORIGIN}/x`, { headers: { cookie, origin: EVIL, host: "localhost:3000" } }),
      ),
    ).rejects.toMatchObject({ name: "CrossOriginError" });
  });
});

/** A body stream that never ends on its own; counts how many 64 KiB chunks were pulled. */
function endlessBody(): {
  stream: ReadableStream<Uint8Array>;
  pulled: () => number;
  cancelled: () => boolean;
} {
  let n = 0;
  let stopped = false;
  const chunk = new Uint8Array(64 * 1024).fill(0x20);
  const stream = new ReadableStream<Uint8Array>({
    // Each chunk waits a turn of the event loop, as bytes from a socket do.
    async pull(controller) {
      await new Promise((r) => setImmediate(r));
      n += 1;
      controller.enqueue(chunk);
    },
    cancel() {
      stopped = true;
    },
  });
  return { stream, pulled: () => n, cancelled: () => stopped };
}

describe("oversized bodies are refused early", () => {
  test("a JSON body declaring more than 1 MiB gets 413 without a byte being read", async () => {
    const { group, client } = await lead();
    const { stream, pulled } = endlessBody();
    const request = new Request(`${APP_ORIGIN}/api/sites`, {
      method: "POST",
      body: stream,
      headers: { "content-type": "application/json", "content-length": String(50 * 1024 * 1024) },
      duplex: "half",
    } as RequestInit);
    const res = await client.call(() => createSitePOST(request));
    expect(res.status).toBe(413);
    expect(((await res.json()) as ErrorJson).error?.code).toBe("too_large");
    expect(pulled()).toBeLessThanOrEqual(1);
    expect(await db("sites").where({ group_id: group.id }).first()).toBeUndefined();
  });

  test("a JSON body without Content-Length is cut off once it passes the limit (the stream is endless)", async () => {
    const { client } = await lead();
    const { stream, pulled, cancelled } = endlessBody();
    const request = new Request(`${APP_ORIGIN}/api/sites`, {
      method: "POST",
      body: stream,
      headers: { "content-type": "application/json" },
      duplex: "half",
    } as RequestInit);
    const res = await client.call(() => createSitePOST(request));
    expect(res.status).toBe(413);
    // 1 MiB of 64 KiB chunks is 16; a few more may sit in the stream's queue.
    expect(pulled()).toBeLessThan(JSON_BODY_LIMIT / (64 * 1024) + 4);
    // The reader let go of the body instead of draining it.
    expect(cancelled()).toBe(true);
  });

  test("a body at the limit is read", async () => {
    const padded = JSON.stringify({ pad: "x".repeat(JSON_BODY_LIMIT - 20) });
    expect(Buffer.byteLength(padded)).toBeLessThanOrEqual(JSON_BODY_LIMIT);
    const parsed = (await readJson(new Request(`${APP_ORIGIN}/x`, { method: "POST", body: padded }))) as {
      pad: string;
    };
    expect(parsed.pad.length).toBe(JSON_BODY_LIMIT - 20);
  });

  test("the upload route refuses a declared size above IMPORT_MAX_BYTES with 413 before reading", async () => {
    const { user, group } = await createUserWithGroup({ role: "analyst" });
    const site = await createSiteFor(group.id);
    const client = await clientFor(user, { groupId: group.id });
    const { stream, pulled } = endlessBody();
    const request = new Request(`${APP_ORIGIN}/api/sites/${site.id}/imports`, {
      method: "POST",
      body: stream,
      headers: {
        "content-type": "multipart/form-data; boundary=xyz",
        "content-length": String(env.IMPORT_MAX_BYTES * 2),
      },
      duplex: "half",
    } as RequestInit);
    const res = await client.call(() =>
      uploadPOST(request, { params: Promise.resolve({ siteId: String(site.id) }) }),
    );
    expect(res.status).toBe(413);
    expect(((await res.json()) as ErrorJson).error?.code).toBe("too_large");
    expect(pulled()).toBeLessThanOrEqual(1);
    expect(await db("imports").where({ site_id: site.id }).first()).toBeUndefined();
  });

  test("an upload without Content-Length is cut off as soon as the file passes the limit", async () => {
    const limit = 256 * 1024;
    let n = 0;
    let cancelled = false;
    const enc = new TextEncoder();
    const stream = new ReadableStream<Uint8Array>({
      start(c) {
        c.enqueue(
          enc.encode(
            '--xyz\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\nContent-Type: text/csv\r\n\r\n',
          ),
        );
      },
      async pull(c) {
        await new Promise((r) => setImmediate(r));
        n += 1;
        c.enqueue(enc.encode("2024-06-01T00:00,1.0\n".repeat(3000)));
      },
      cancel() {
        cancelled = true;
      },
    });
    const request = new Request(`${APP_ORIGIN}/upload`, {
      method: "POST",
      body: stream,
      headers: { "content-type": "multipart/form-data; boundary=xyz" },
      duplex: "half",
    } as RequestInit);
    await expect(receiveUpload(request, limit)).rejects.toMatchObject({ status: 413 });
    // ~63 KB per chunk: the limit is passed after about 5; the endless body is not drained.
    expect(n).toBeLessThan(40);
    // The rest of the body is not drained: the request stream was let go.
    await new Promise((r) => setImmediate(r));
    expect(cancelled).toBe(true);
  });
});

describe("sessions", () => {
  test("sign-in issues a new session id; the cookie the browser brought is invalidated", async () => {
    const user = await createUser();
    const planted = await createSessionFor(user.id);
    const client = new FakeClient({ ip: "198.51.100.31" });
    client.cookies.set(planted.cookieName, planted.cookieValue);
    const outcome = await client.run(() =>
      signIn(undefined, formData({ email: user.email, password: user.password })),
    );
    expect(outcome).toEqual({ kind: "redirect", location: "/sites" });
    const now = client.cookies.get(lucia.sessionCookieName)?.value;
    expect(now).toBeTruthy();
    expect(now).not.toBe(planted.sessionId);
    expect((await lucia.validateSession(planted.sessionId)).session).toBeNull();
    expect((await lucia.validateSession(now ?? "")).session?.userId).toBe(user.id);
  });

  test("a forged pre-sign-in cookie is not reused either", async () => {
    const user = await createUser();
    const client = new FakeClient({
      ip: "198.51.100.32",
      cookies: { [lucia.sessionCookieName]: "attacker-chosen-id" },
    });
    await client.run(() => signIn(undefined, formData({ email: user.email, password: user.password })));
    const now = client.cookies.get(lucia.sessionCookieName)?.value;
    expect(now).toBeTruthy();
    expect(now).not.toBe("attacker-chosen-id");
  });

  test("sign-out invalidates the session on the server: the old cookie no longer signs in", async () => {
    const user = await createUser();
    const client = await clientFor(user);
    const sessionId = client.cookies.get(lucia.sessionCookieName)?.value ?? "";
    expect(await client.run(() => signOut())).toEqual({ kind: "redirect", location: "/sign-in" });
    expect(client.cookies.get(lucia.sessionCookieName)).toBeUndefined();
    expect(await db("user_sessions").where({ id: sessionId }).first()).toBeUndefined();
    const replay = new FakeClient({ cookies: { [lucia.sessionCookieName]: sessionId } });
    await expect(replay.call(() => requireSession())).rejects.toMatchObject({ code: "unauthenticated" });
  });
});

describe("error answers", () => {
  test("a database error in a handler answers 500 without the SQL, the database message or a stack trace", async () => {
    const { client } = await lead();
    // A real MariaDB error (unknown table), thrown where the handler reads the sites.
    const dbError = await db.raw("SELECT secret_column FROM no_such_table_for_h3").catch((e: unknown) => e);
    expect(dbError).toBeInstanceOf(Error);
    vi.mocked(siteQueries.listSites).mockRejectedValueOnce(dbError);
    const spy = vi.spyOn(console, "error").mockImplementation(() => undefined);
    try {
      const res = await client.call(() => listSitesGET(new Request(`${APP_ORIGIN}/api/sites`)));
      expect(res.status).toBe(500);
      const text = await res.text();
      expect(JSON.parse(text)).toEqual({ error: { code: "internal", message: "Something went wrong" } });
      for (const leak of [
        "no_such_table",
        "secret_column",
        "SELECT",
        "ER_",
        "errno",
        "sqlMessage",
        "    at ",
        ".ts:",
      ]) {
        expect(text).not.toContain(leak);
      }
      // The cause is kept for the operator, on the server.
      expect(spy).toHaveBeenCalled();
    } finally {
      spy.mockRestore();
    }
  });

  test("bad JSON answers 400 with a plain message, not the parser's", async () => {
    const { client } = await lead();
    const res = await client.call(() =>
      createSitePOST(
        new Request(`${APP_ORIGIN}/api/sites`, {
          method: "POST",
          body: "{not json",
          headers: { "content-type": "application/json" },
        }),
      ),
    );
    expect(res.status).toBe(400);
    const text = await res.text();
    expect(JSON.parse(text)).toEqual({
      error: { code: "bad_json", message: "The request body is not valid JSON." },
    });
    expect(text).not.toMatch(/position|Unexpected token|SyntaxError/);
  });
});
