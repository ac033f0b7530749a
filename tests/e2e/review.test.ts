import type { Page } from "playwright-core";
import { describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { DEMO_GROUP_NAME, DEMO_PASSWORD, DEMO_SITE } from "@/lib/demo/scenario";
import { DEMO_INJECTED_RISES, seedDemoData } from "@/db/seeds/02_demo_data";
import { appInBrowserForFile, screenshot } from "@/tests/support/browser";
import { seriousViolations } from "@/tests/support/axe";

/*
 * The demo analyst reviews evenings without the mouse: calendar, evening page, an override
 * with a note, the history. The demo data is synthetic (db/seeds/02_demo_data.ts).
 */

let siteId: number;

const rig = appInBrowserForFile({
  prepare: async () => {
    await seedDemoData(db);
    const group = await db("research_groups").where({ name: DEMO_GROUP_NAME }).first<{ id: number }>("id");
    const site = await db("sites").where({ group_id: group?.id ?? -1, name: DEMO_SITE.name }).first<{ id: number }>("id");
    if (!site) throw new Error("demo site missing");
    siteId = site.id;
  },
});


async function activeDate(page: Page): Promise<string | null> {
  return page.evaluate(() => document.activeElement?.getAttribute("data-date") ?? null);
}

describe("reviewing with the keyboard as the demo analyst", () => {
  test("sign in, open the calendar, move to an evening, override it with a note, see it in the history", { timeout: 120_000 }, async () => {
    const { page } = rig.browser;
    await page.goto(`${rig.app.url}/sign-in`);
    await page.getByLabel("E-mail address").focus();
    await page.keyboard.type("analyst@demo.gloaming.test");
    await page.keyboard.press("Tab");
    await page.keyboard.type(DEMO_PASSWORD);
    await page.keyboard.press("Enter");
    await page.waitForURL(/\/sites$/);

    await page.goto(`${rig.app.url}/sites/${siteId}/calendar?month=2024-06`);
    await page.getByRole("grid", { name: "June 2024" }).waitFor();
    await page.locator('a[data-date="2024-06-03"]').waitFor();
    // The demo's known post-sunset isoprene rise (synthetic truth) carries the anomaly marker,
    // named in the day's focus text and shown as a glyph.
    const risen = "2024-06-25";
    expect(DEMO_INJECTED_RISES).toContain(risen);
    // A day of the month grid is named by its hidden description (the year view uses aria-label).
    const risenDay = page.locator(`a[data-date="${risen}"]`, { hasText: "ISOPRENE rise after sunset" });
    await risenDay.waitFor();
    expect(await risenDay.textContent()).toMatch(/; \d+ anomal(y|ies): .*ISOPRENE rise after sunset/);
    expect(await page.locator(`a[data-date="${risen}"] [title*="ISOPRENE rise after sunset"]`).count()).toBe(1);

    // Tab to the calendar's single tab stop, then arrows: right one day, down one week.
    let date: string | null = null;
    for (let i = 0; i < 60 && date === null; i++) {
      await page.keyboard.press("Tab");
      date = await activeDate(page);
    }
    expect(date).toMatch(/^2024-06-/);
    await page.keyboard.press("ArrowRight");
    await page.keyboard.press("ArrowDown");
    const target = await activeDate(page);
    expect(target).not.toBe(date);
    // Page Down pages the month without reloading the page; Page Up comes back.
    await page.keyboard.press("PageDown");
    await page.getByRole("grid", { name: "July 2024" }).waitFor();
    await page.keyboard.press("PageUp");
    await page.getByRole("grid", { name: "June 2024" }).waitFor();
    expect(await activeDate(page)).toBe(target);
    await screenshot(page, "review-calendar");
    expect(await seriousViolations(page)).toEqual([]);

    await page.keyboard.press("Enter");
    await page.waitForURL(/\/evenings\/\d+$/);
    await page.getByRole("heading", { level: 1, name: /^Evening of/ }).waitFor();
    await page.getByRole("img", { name: /σw/ }).first().waitFor();
    // Hydrated: the charts have measured their container.
    await page.waitForFunction(() => {
      const svg = document.querySelector('svg[role="img"]');
      const w = svg?.parentElement?.getBoundingClientRect().width ?? 0;
      return svg?.getAttribute("viewBox")?.split(" ")[2] === String(Math.max(280, Math.floor(w)));
    });
    await screenshot(page, "review-evening");
    expect(await seriousViolations(page)).toEqual([]);

    const before = (await page.getByTestId("current-label").textContent())?.trim();
    const [key, name] = before === "stagnant" ? ["3", "advective"] : ["2", "stagnant"];
    const note = `Keyboard review: fog at the tower, wind sensor stalled (test ${Date.now()}).`;
    // Focus on the page body, away from any field, then: label key, note, Ctrl+Enter.
    await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
    await page.keyboard.press(key);
    await expect.poll(() => page.evaluate(() => document.activeElement?.id)).toBe("override-note");
    await page.keyboard.type(note);
    await page.keyboard.press("Control+Enter");

    const history = page.getByRole("list", { name: "History of this evening" });
    await history.getByText(note).waitFor();
    expect(await history.getByText(/Override:/).count()).toBeGreaterThan(0);
    expect((await page.getByTestId("current-label").textContent())?.trim()).toBe(name);
    await page.emulateMedia({ colorScheme: "dark" });
    await screenshot(page, "review-evening-dark");
    await page.emulateMedia({ colorScheme: "light" });

    // The help overlay opens with ? and closes with Escape.
    await page.keyboard.press("?");
    await page.getByRole("dialog", { name: "Review keys" }).waitFor();
    await page.keyboard.press("Escape");
  });

  test("the review queue and the twelve-month view render with the override in place", { timeout: 60_000 }, async () => {
    const { page } = rig.browser;
    // The evening of a known rise: its isoprene chart shows the anomaly span.
    await page.goto(`${rig.app.url}/sites/${siteId}/calendar?month=2024-06`);
    await page.locator('a[data-date="2024-06-25"]').click();
    await page.waitForURL(/\/evenings\/\d+$/);
    await page.getByRole("img", { name: /^ISOPRENE .*rise after sunset/ }).waitFor();
    await screenshot(page, "review-evening-anomaly");

    await page.goto(`${rig.app.url}/sites/${siteId}/review?month=2024-06`);
    await page.getByRole("list", { name: "Evenings by need of review" }).waitFor();
    await page.getByText(/anomal(y|ies): ISOPRENE rise after sunset/).first().waitFor();
    await page.keyboard.press("j");
    await screenshot(page, "review-queue");
    await page.goto(`${rig.app.url}/sites/${siteId}/calendar?month=2024-06&view=year`);
    await page.getByRole("grid", { name: "Dec" }).waitFor();
    expect(await page.locator('a[aria-label*="overridden"]').count()).toBeGreaterThan(0);
    // The twelve-month view marks the same evening (a corner glyph; the name says which flag).
    await page.locator('a[data-date="2024-06-25"][aria-label*="ISOPRENE rise after sunset"]').waitFor();
    await screenshot(page, "review-year");
    await page.goto(`${rig.app.url}/sites/${siteId}/regime`);
    await page.getByRole("img", { name: /against wind speed/ }).waitFor();
    await screenshot(page, "review-regime");
  });
});
