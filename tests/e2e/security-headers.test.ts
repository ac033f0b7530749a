import { readFileSync } from "node:fs";
import path from "node:path";
import type { Page } from "playwright-core";
import { describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import {
  createSessionFor,
  createSiteFor,
  createUserWithGroup,
  TEST_PASSWORD,
  type TestUser,
} from "@/tests/support/db";
import { appInBrowserForFile, screenshot } from "@/tests/support/browser";
import { insertEvenings } from "@/tests/features/review/fixtures";

/*
 * Under `next start`, sign-in, a calendar and an evening page load with the security headers of
 * next.config.ts and the browser reports no Content-Security-Policy violation on any of them
 * (the pages hydrate and run with the policy in force). The evenings are synthetic fixtures.
 */

let person: TestUser;
let siteId: number;
let eveningId: number;

const rig = appInBrowserForFile({
  prepare: async () => {
    const { user, group } = await createUserWithGroup({ role: "analyst" });
    person = user;
    const site = await createSiteFor(group.id, { name: "Synthetic header tower" });
    siteId = site.id;
    const ids = await insertEvenings(site.id, [
      { date: "2024-06-03" },
      { date: "2024-06-04", autoLabel: "advective" },
    ]);
    eveningId = ids[0] as number;
  },
  // Violations reach the page as events before any app script runs; keep them on window.
  afterLaunch: ({ browser }) =>
    browser.context.addInitScript(() => {
      const w = window as unknown as { __cspViolations: string[] };
      w.__cspViolations = [];
      document.addEventListener("securitypolicyviolation", (e) => {
        w.__cspViolations.push(`${e.violatedDirective} ${e.blockedURI} ${e.sourceFile}:${e.lineNumber}`);
      });
    }),
  timeoutMs: 600_000,
});

/** Console messages about the policy (chromium logs each refused load or inline script). */
function watchConsole(page: Page): string[] {
  const seen: string[] = [];
  page.on("console", (m) => {
    const text = m.text();
    if (/Content Security Policy|Content-Security-Policy|Permissions-Policy/i.test(text)) seen.push(text);
  });
  return seen;
}

async function violations(page: Page): Promise<string[]> {
  return page.evaluate(() => (window as unknown as { __cspViolations?: string[] }).__cspViolations ?? []);
}

function expectSecurityHeaders(headers: Record<string, string>): void {
  const csp = headers["content-security-policy"] ?? "";
  for (const directive of [
    "default-src 'self'",
    "frame-ancestors 'none'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
  ]) {
    expect(csp).toContain(directive);
  }
  // A production build needs no eval.
  expect(csp).not.toContain("unsafe-eval");
  expect(headers["x-content-type-options"]).toBe("nosniff");
  expect(headers["x-frame-options"]).toBe("DENY");
  expect(headers["referrer-policy"]).toBe("strict-origin-when-cross-origin");
  expect(headers["permissions-policy"]).toContain("camera=()");
}

describe("security headers and the content security policy", () => {
  test(
    "sign-in, calendar and evening page: headers present, no policy violation",
    { timeout: 180_000 },
    async () => {
      const { page } = rig.browser;
      const consoleSeen = watchConsole(page);

      const signInPage = await page.goto(`${rig.app.url}/sign-in`);
      expectSecurityHeaders((await signInPage?.allHeaders()) ?? {});
      // Sign in through the form: the server action passes Next's Origin check and ours.
      await page.getByLabel("E-mail address").fill(person.email);
      await page.getByLabel("Password", { exact: true }).fill(TEST_PASSWORD);
      await page.getByRole("button", { name: "Sign in", exact: true }).click();
      await page.waitForURL(/\/sites$/);
      expect(await violations(page)).toEqual([]);

      const calendar = await page.goto(`${rig.app.url}/sites/${siteId}/calendar?month=2024-06`);
      expectSecurityHeaders((await calendar?.allHeaders()) ?? {});
      await page.getByRole("grid", { name: "June 2024" }).waitFor();
      await page.locator('a[data-date="2024-06-03"]').waitFor();
      await page.waitForLoadState("networkidle");
      expect(await violations(page)).toEqual([]);
      await screenshot(page, "security-headers-calendar");

      const evening = await page.goto(`${rig.app.url}/sites/${siteId}/evenings/${eveningId}`);
      expectSecurityHeaders((await evening?.allHeaders()) ?? {});
      await page.getByRole("heading", { level: 1 }).waitFor();
      await page.waitForLoadState("networkidle");
      expect(await violations(page)).toEqual([]);

      // Route handlers carry the same headers.
      const api = await page.request.get(`${rig.app.url}/api/sites/${siteId}`);
      expect(api.status()).toBe(200);
      expectSecurityHeaders(api.headers());

      expect(consoleSeen).toEqual([]);
    },
  );

  // Server actions are not behind our Origin check (they carry no Request); Next compares the
  // Origin of every action POST with the Host itself. signOut, as the simplest action with an
  // effect: from another site it must leave the session alive, from the app it ends it.
  test("Next refuses a server action posted with another site's Origin", { timeout: 60_000 }, async () => {
    const manifest = JSON.parse(
      readFileSync(path.join(process.cwd(), ".next/server/server-reference-manifest.json"), "utf8"),
    ) as {
      node: Record<string, { exportedName?: string; filename?: string }>;
    };
    const actionId = Object.entries(manifest.node).find(
      ([, v]) => v.exportedName === "signOut" && v.filename === "features/auth/server/actions.ts",
    )?.[0];
    expect(actionId).toBeTruthy();
    const { sessionId, cookieName, cookieValue } = await createSessionFor(person.id);
    const post = (origin: string) =>
      fetch(`${rig.app.url}/sites`, {
        method: "POST",
        redirect: "manual",
        headers: {
          "next-action": actionId ?? "",
          origin,
          cookie: `${cookieName}=${cookieValue}`,
          "content-type": "text/plain;charset=UTF-8",
          accept: "text/x-component",
        },
        body: "[]",
      });
    const alive = async () => Boolean(await db("user_sessions").where({ id: sessionId }).first());

    const foreign = await post("https://tower-data.invalid");
    expect(foreign.status).toBeGreaterThanOrEqual(400);
    await foreign.text();
    expect(await alive()).toBe(true);

    const own = await post(rig.app.url);
    await own.text();
    expect(await alive()).toBe(false);
  });
});
