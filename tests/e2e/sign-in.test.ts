import { describe, expect, test } from "vitest";
import { DEMO_SITE } from "@/lib/demo/scenario";
import { screenshot, appInBrowserForFile } from "@/tests/support/browser";
import { seedDemo } from "@/tests/support/db";

const rig = appInBrowserForFile({ prepare: seedDemo });

// The tests share one browser profile and run in order: refused, signed in, narrow screen.
describe("signing in as the demo analyst", () => {
  test("a wrong password is refused with a message and the address kept", async () => {
    const { page } = rig.browser;
    await page.goto(`${rig.app.url}/sign-in`);
    await page.getByLabel("E-mail address").fill("viewer@demo.gloaming.test");
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in", exact: true }).click();
    // Next's route announcer is an alert too: look for ours by its text.
    await page.getByRole("alert").filter({ hasText: "not right" }).waitFor();
    expect(await page.getByLabel("E-mail address").inputValue()).toBe("viewer@demo.gloaming.test");
  });

  test("the demo account fills in with one click and leads to the site list", async () => {
    const { page } = rig.browser;
    await page.goto(`${rig.app.url}/`);
    await page.waitForURL(/\/sign-in$/);
    await screenshot(page, "sign-in");

    await page.getByRole("button", { name: /Fill in the demo analyst/ }).click();
    expect(await page.getByLabel("E-mail address").inputValue()).toBe("analyst@demo.gloaming.test");
    await page.getByRole("button", { name: "Sign in", exact: true }).click();

    await page.waitForURL(/\/sites$/);
    await page.getByRole("heading", { level: 1, name: "Sites" }).waitFor();
    const list = page.getByRole("list", { name: "Sites" });
    await expect(list.getByRole("link", { name: DEMO_SITE.name }).count()).resolves.toBe(1);
    // An analyst reads sites but cannot add them.
    expect(await page.getByRole("link", { name: /New site/ }).count()).toBe(0);
    // The caution travels with every signed-in page.
    expect(await page.getByText(/screening aids for research data/).count()).toBeGreaterThan(0);
    await screenshot(page, "sites-analyst");
    await page.emulateMedia({ colorScheme: "dark", reducedMotion: "reduce" });
    await screenshot(page, "sites-analyst-dark");
    await page.emulateMedia({ colorScheme: "light" });

    await list.getByRole("link", { name: DEMO_SITE.name }).click();
    await page.getByRole("heading", { level: 1, name: DEMO_SITE.name }).waitFor();
    expect(await page.getByRole("button", { name: "Delete site" }).count()).toBe(0);
    await screenshot(page, "site-analyst");
  });

  test("on a narrow screen the menu opens the navigation", async () => {
    const { page } = rig.browser;
    await page.setViewportSize({ width: 390, height: 780 });
    await page.goto(`${rig.app.url}/sites`);
    const menu = page.getByRole("button", { name: "Menu" });
    await menu.click();
    expect(await menu.getAttribute("aria-expanded")).toBe("true");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Sites" }).waitFor();
    await screenshot(page, "sites-mobile-menu");
    await page.keyboard.press("Escape");
    expect(await menu.getAttribute("aria-expanded")).toBe("false");
  });

  test("signing out from the account menu, then the demo lead sees field errors on a new site", async () => {
    const { page } = rig.browser;
    await page.setViewportSize({ width: 1280, height: 800 });
    await page.goto(`${rig.app.url}/sites`);
    // The account button is named by its visible text first (the signed-in analyst), then its purpose.
    await page.getByRole("button", { name: /^Demo Analyst \(invented\).*your account$/ }).click();
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in$/);

    await page.getByRole("button", { name: /Fill in the demo lead/ }).click();
    await page.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.waitForURL(/\/sites$/);
    await page.getByRole("link", { name: /New site/ }).click();
    await page.getByRole("heading", { level: 1, name: "New site" }).waitFor();
    await page.getByLabel("Latitude").fill("95");
    await page.getByRole("button", { name: "Create site" }).click();

    const latitude = page.getByLabel("Latitude");
    await page.getByText("The latitude must be at most 90°.").waitFor();
    expect(await latitude.getAttribute("aria-invalid")).toBe("true");
    expect(await latitude.getAttribute("aria-describedby")).toContain("latitude-error");
    // What was typed survives the failed submit.
    expect(await latitude.inputValue()).toBe("95");
    expect(await page.getByText("Enter a name for the site.").count()).toBe(1);
    await screenshot(page, "new-site-errors");
  });
});
