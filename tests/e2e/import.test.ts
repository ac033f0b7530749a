import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runWorker } from "@/lib/jobs/worker";
import { importJobHandlers } from "@/features/imports/server/jobs";
import { createSessionFor } from "@/tests/support/db";
import { addSessionCookies, launchBrowser, screenshot, startApp, type BrowserSession, type RunningApp } from "@/tests/support/browser";
import { analystWithSite, halfHourCount, syntheticCsv } from "@/tests/features/imports/helpers";

/*
 * An analyst takes a SYNTHETIC year of half-hours from disk into classified evenings through
 * the browser: preview, mapping, upload with a progress bar to 100 %, the job, the report.
 * The app runs under `next start`; the import worker runs in this process against the same
 * database, as `npm start` runs it beside the app.
 */

let app: RunningApp;
let browser: BrowserSession;
const stopWorker = new AbortController();
let worker: Promise<void>;
const dir = mkdtempSync(path.join(tmpdir(), "gloaming-import-e2e-"));

beforeAll(async () => {
  app = await startApp();
  browser = await launchBrowser();
  worker = runWorker({ handlers: importJobHandlers, pollMs: 200, signal: stopWorker.signal });
});

afterAll(async () => {
  stopWorker.abort();
  await worker;
  await browser?.close();
  await app?.stop();
  rmSync(dir, { recursive: true, force: true });
});

describe("importing through the page", () => {
  test("preview, upload with progress to 100 %, then the report", { timeout: 240_000 }, async () => {
    const { site, userId } = await analystWithSite();
    await addSessionCookies(browser.context, app.url, await createSessionFor(userId));
    const file = path.join(dir, "tower-synthetic-2022.csv");
    const lines = syntheticCsv(365, { startDate: "2022-01-01", seed: 21 }).split("\n");
    // Two bad cells, to see them in the report with their line numbers.
    lines[10] = (lines[10] as string).replace(/^([^,]*,[^,]*,)[^,]*/, "$1windy");
    writeFileSync(file, lines.join("\n"));

    const { page } = browser;
    await page.goto(`${app.url}/sites/${site.id}/imports`);
    await page.getByRole("heading", { level: 1, name: "Import" }).waitFor();
    await page.locator('input[type="file"]').setInputFiles(file);
    await page.getByRole("heading", { name: "First rows" }).waitFor();
    expect(await page.getByRole("combobox", { name: "Read WS as" }).inputValue()).toBe("WS");
    expect(await page.getByRole("combobox", { name: "Read TIMESTAMP_START as" }).inputValue()).toBe("TIMESTAMP_START");
    await screenshot(page, "import-preview");

    // Record every value the upload bar shows.
    await page.evaluate(() => {
      const seen: number[] = [];
      (window as unknown as { __progress: number[] }).__progress = seen;
      const note = () => {
        const bar = document.querySelector('[role="progressbar"][aria-label="Uploading"], [role="progressbar"][aria-label="Uploaded"]');
        const v = Number(bar?.getAttribute("aria-valuenow") ?? NaN);
        if (Number.isFinite(v) && seen[seen.length - 1] !== v) seen.push(v);
      };
      new MutationObserver(note).observe(document.body, { subtree: true, childList: true, attributes: true, attributeFilter: ["aria-valuenow"] });
    });
    await page.getByRole("button", { name: "Upload and import" }).click();

    const outcome = page.getByTestId("import-outcome");
    await outcome.waitFor({ timeout: 180_000 });
    expect(await outcome.getAttribute("data-status")).toBe("landed");
    const seen = await page.evaluate(() => (window as unknown as { __progress: number[] }).__progress);
    expect(seen.at(-1)).toBe(100);
    expect([...seen].sort((a, b) => a - b)).toEqual(seen);

    await expect(outcome.getByText(/Imported 17,520 half-hours/).count()).resolves.toBe(1);
    const report = page.getByTestId("import-report");
    await expect(report.getByRole("cell", { name: "WS", exact: true }).count()).resolves.toBeGreaterThan(0);
    await expect(report.getByRole("cell", { name: "windy" }).count()).resolves.toBe(1);
    await expect(report.getByRole("link", { name: /Download the full list/ }).count()).resolves.toBe(1);
    expect(await halfHourCount(site.id)).toBe(17_520);
    await screenshot(page, "import-report");
  });
});
