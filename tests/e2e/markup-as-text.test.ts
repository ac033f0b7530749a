import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Page } from "playwright-core";
import Papa from "papaparse";
import { POST as overridePost } from "@/app/api/evenings/[eveningId]/overrides/route";
import { GET as exportGet } from "@/app/api/sites/[siteId]/export/route";
import { insertEvenings } from "@/tests/features/seasons/evening-rows";
import { unzipBuffer } from "@/tests/features/exports/unzip";
import { launchBrowser, screenshot, signInAs, startApp, type BrowserSession, type RunningApp } from "@/tests/support/browser";
import { addMember, clientFor, createSiteFor, createUser, createUserWithGroup, TEST_PASSWORD, type TestUser } from "@/tests/support/db";

/*
 * Names and notes people type are shown as text, never run as markup: a site name, a member's
 * display name and an override note carrying an <img onerror> and a <script> are stored through
 * the app's own paths, then the sites list, the evening page (history) and the team page are
 * opened in a real browser. The evenings are hand-made test rows (no real site).
 */

const IMG = "<img src=x onerror=window.__pwned=1>";
const SCRIPT = "<script>window.__pwned=1</script>";
const MARKUP = `${IMG} ${SCRIPT}`;
const BASE = "http://localhost:3000";

let app: RunningApp;
let browser: BrowserSession;
let lead: TestUser;
let siteId: number;
let eveningId: number;

beforeAll(async () => {
  const made = await createUserWithGroup({ role: "lead" });
  lead = made.user;
  const site = await createSiteFor(made.group.id, { name: `Tower ${IMG}`.slice(0, 120) });
  siteId = site.id;
  const member = await createUser({ displayName: `Member ${MARKUP}` });
  await addMember(member.id, made.group.id, "analyst");
  const ids = await insertEvenings(siteId, [
    { date: "2022-06-01", auto: "local" },
    { date: "2022-06-02", auto: "stagnant" },
  ]);
  eveningId = ids[0] as number;
  // The override goes through the real route handler, so the history holds the note as stored.
  const client = await clientFor(lead, { groupId: made.group.id });
  const res = await client.call(() =>
    overridePost(
      new Request(`${BASE}/api/evenings/${eveningId}/overrides`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ label: "advective", note: `Note ${MARKUP}`, version: 1 }) }),
      { params: Promise.resolve({ eveningId: String(eveningId) }) },
    ),
  );
  if (res.status !== 200) throw new Error(`override answered ${res.status}: ${await res.text()}`);
  app = await startApp();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

/** Nothing ran and no element came out of the text. */
async function expectInert(page: Page): Promise<void> {
  expect(await page.evaluate(() => (window as unknown as { __pwned?: unknown }).__pwned)).toBeUndefined();
  expect(await page.locator('img[src="x"]').count()).toBe(0);
  // The framework's inline data scripts carry the text as JSON strings; a script element made
  // from the text itself would hold exactly its body.
  expect(await page.evaluate(() => [...document.scripts].some((s) => s.textContent?.trim() === "window.__pwned=1"))).toBe(false);
}

describe("names and notes with markup are shown as text", () => {
  test("sites list, evening page with its history, and team page", { timeout: 180_000 }, async () => {
    const { page } = browser;
    await signInAs(page, app.url, lead.email, { password: TEST_PASSWORD, landing: (u) => !u.pathname.startsWith("/sign-in") });

    await page.goto(`${app.url}/sites`);
    await page.getByText(`Tower ${IMG}`).first().waitFor();
    await expectInert(page);
    await screenshot(page, "markup-sites");

    await page.goto(`${app.url}/sites/${siteId}/evenings/${eveningId}`);
    await page.getByText(`Note ${MARKUP}`).first().waitFor();
    await expectInert(page);
    await screenshot(page, "markup-evening");

    await page.goto(`${app.url}/team`);
    await page.getByText(`Member ${MARKUP}`).first().waitFor();
    await expectInert(page);
    await screenshot(page, "markup-team");
  });

  test("the export keeps the note and the site name as text", async () => {
    const client = await clientFor(lead);
    const res = await client.call(() => exportGet(new Request(`${BASE}/api/sites/${siteId}/export?from=2022-06-01&to=2022-06-02`), { params: Promise.resolve({ siteId: String(siteId) }) }));
    expect(res.status).toBe(200);
    const files = await unzipBuffer(Buffer.from(await res.arrayBuffer()));
    const rows = Papa.parse<Record<string, string>>(([...files.entries()].find(([n]) => n.endsWith("evenings.csv"))?.[1] ?? Buffer.alloc(0)).toString("utf8"), { header: true, skipEmptyLines: true }).data;
    const overridden = rows.find((r) => r.date === "2022-06-01");
    expect(overridden?.note).toBe(`Note ${MARKUP}`);
    expect(overridden?.site).toBe(`Tower ${IMG}`);
  });
});
