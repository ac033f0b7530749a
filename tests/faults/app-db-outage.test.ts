/*
 * The built app (`next start`) against a MariaDB of this file's own, stopped and started while
 * the app keeps running: the API answers 503 with Retry-After, a signed-in page shows the error
 * page in the browser (no stack, no SQL), and both work again after the restart.
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import {
  addSessionCookies,
  launchBrowser,
  screenshot,
  startApp,
  type BrowserSession,
  type RunningApp,
} from "@/tests/support/browser";
import { startPrivateDb, type PrivateDb } from "@/tests/faults/private-db";

let server: PrivateDb;
let app: RunningApp;
let browser: BrowserSession;
let cookie = "";
let closeDb: () => Promise<void>;

const LEAKS = [/\bat \S+ \(/, /node_modules/, /select .* from/i, /ECONN|PROTOCOL_|ER_[A-Z_]+/, /mysql:\/\//];

beforeAll(async () => {
  server = await startPrivateDb();
  process.env.DATABASE_URL = server.url;
  ({ closeDb } = await import("@/lib/db/knex"));
  const { createUserWithGroup, createSiteFor, createSessionFor } = await import("@/tests/support/db");
  const { user, group } = await createUserWithGroup({ role: "lead" });
  await createSiteFor(group.id, { name: "Synthetic outage site" });
  const s = await createSessionFor(user.id);
  cookie = `${s.cookieName}=${s.cookieValue}; gloaming_group=${group.id}`;
  app = await startApp({ env: { DATABASE_URL: server.url } });
  browser = await launchBrowser();
  await addSessionCookies(browser.context, app.url, s, group.id);
}, 900_000);

afterAll(async () => {
  await browser?.close();
  await app?.stop();
  await closeDb?.().catch(() => undefined);
  await server?.destroy();
});

const api = () => fetch(`${app.url}/api/sites`, { headers: { cookie } });

describe("the running app while its database restarts", () => {
  test("503 from the API and an error page in the browser, then normal service without restarting the app", async () => {
    const ok = await api();
    expect(ok.status).toBe(200);
    await browser.page.goto(`${app.url}/sites`);
    await expect.poll(() => browser.page.getByText("Synthetic outage site").count()).toBeGreaterThan(0);

    await server.stop();
    for (let i = 0; i < 5; i++) {
      const res = await api();
      const text = await res.text();
      expect(res.status, text).toBe(503);
      expect(res.headers.get("retry-after")).toMatch(/^\d+$/);
      expect(JSON.parse(text)).toEqual({
        error: { code: "unavailable", message: "The database is not reachable; try again in a moment." },
      });
      for (const leak of LEAKS) expect(text).not.toMatch(leak);
    }

    const page = await browser.page.goto(`${app.url}/sites`);
    expect(page?.status()).toBeGreaterThanOrEqual(500);
    await expect
      .poll(() => browser.page.getByRole("alert").filter({ hasText: "database is restarting" }).count())
      .toBeGreaterThan(0);
    const html = await browser.page.content();
    for (const leak of LEAKS) expect(html).not.toMatch(leak);
    await screenshot(browser.page, "faults-db-outage-page");

    await server.start();
    await expect.poll(async () => (await api()).status, { timeout: 60_000, interval: 500 }).toBe(200);
    for (let i = 0; i < 5; i++) expect((await api()).status).toBe(200);
    await browser.page.getByRole("button", { name: "Try again" }).click();
    await expect
      .poll(() => browser.page.getByText("Synthetic outage site").count(), { timeout: 30_000 })
      .toBeGreaterThan(0);
  }, 600_000);
});
