import { describe, expect, test } from "vitest";
import { screenshot, signInAs, appInBrowserForFile } from "@/tests/support/browser";
import { seriousViolations } from "@/tests/support/axe";
import { db } from "@/lib/db/knex";
import { seedDemoData } from "@/db/seeds/02_demo_data";

/*
 * The demo lead previews a threshold change on /rules: the what-if counts by label before and
 * after, over the demo's synthetic evenings. Nothing is saved.
 */

// The editor needs a rule set and the preview evenings: the demo data gives both (it seeds the
// scenario too), so the test does not depend on another file having imported them first.
const rig = appInBrowserForFile({ prepare: () => seedDemoData(db) });


describe("the rules page", () => {
  test("the demo lead previews a threshold change and reads the what-if counts", { timeout: 180_000 }, async () => {
    const { page } = rig.browser;
    await signInAs(page, rig.app.url, "lead@demo.gloaming.test");

    await page.goto(`${rig.app.url}/rules`);
    await page.getByRole("heading", { level: 1, name: "Rules" }).waitFor();
    const threshold = page.getByRole("spinbutton", { name: / value$/ }).first();
    const before = Number(await threshold.inputValue());
    await threshold.fill(String(before * 1.5 || 1));
    await page.getByRole("button", { name: "Preview", exact: true }).click();

    const summary = page.getByText(/of \d+ evenings would change/);
    await summary.waitFor({ timeout: 120_000 });
    const total = Number(/of (\d+) evenings/.exec((await summary.textContent()) ?? "")?.[1]);
    expect(total).toBeGreaterThan(0);
    // Each column of counts by label covers every evening of the period.
    const table = page.getByRole("table").filter({ has: page.getByRole("columnheader", { name: "With this edit" }) });
    const rows = await table.locator("tbody tr").all();
    expect(rows).toHaveLength(4);
    let now = 0;
    let after = 0;
    for (const row of rows) {
      const cells = row.getByRole("cell");
      now += Number(await cells.nth(1).textContent());
      after += Number(await cells.nth(2).textContent());
    }
    expect(now).toBe(total);
    expect(after).toBe(total);
    await screenshot(page, "rules-preview");
    expect(await seriousViolations(page)).toEqual([]);
  });
});
