import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { createSessionFor, createSiteFor, createUserWithGroup } from "@/tests/support/db";
import { addSessionCookies, launchBrowser, screenshot, startApp, type BrowserSession, type RunningApp } from "@/tests/support/browser";
import { datesBetween, insertEvenings } from "@/tests/features/seasons/evening-rows";
import { unzipBuffer } from "@/tests/features/exports/unzip";
import type { LabelKey } from "@/lib/ui/label-badge";

/*
 * A viewer opens the seasons page for two invented sites (one in each hemisphere), downloads a
 * chart as SVG and PNG and the table as CSV, then downloads an export zip from the export page.
 */

let app: RunningApp;
let browser: BrowserSession;

beforeAll(async () => {
  app = await startApp();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

const LABELS: LabelKey[] = ["local", "stagnant", "advective", "unclassified"];

describe("seasons and export in the browser", () => {
  test("downloads a chart, the table and an export zip", { timeout: 300_000 }, async () => {
    const { user, group } = await createUserWithGroup({ role: "viewer", groupName: `Synthetic group ${Date.now()}` });
    const north = await createSiteFor(group.id, { name: "Synthetic north tower", latitude: 47.2 });
    const south = await createSiteFor(group.id, { name: "Synthetic south tower", latitude: -35.3 });
    const dates = datesBetween("2021-01-01", "2022-12-31");
    const label = (d: string, i: number): LabelKey => {
      const m = Number(d.slice(5, 7));
      return (m === 7 || m === 8) && i % 3 ? "stagnant" : (LABELS[(i * 5 + m) % 4] ?? "local");
    };
    await insertEvenings(north.id, dates.map((date, i) => ({ date, auto: label(date, i) })));
    await insertEvenings(south.id, dates.map((date, i) => ({ date, auto: label(date, i + 1), final: i % 17 === 0 ? "local" : undefined, note: i % 17 === 0 ? "=checked by hand" : undefined })));
    await addSessionCookies(browser.context, app.url, await createSessionFor(user.id));
    const { page } = browser;

    await page.goto(`${app.url}/seasons`);
    await page.getByRole("heading", { level: 1, name: "Seasons" }).waitFor();
    await page.getByText("Does the mix change with the season?").waitFor();
    expect(await page.getByText("screening aids").count()).toBeGreaterThan(0);
    await screenshot(page, "seasons-page");

    const save = async (name: string) => {
      const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name }).first().click()]);
      const file = await download.path();
      return { name: download.suggestedFilename(), bytes: readFileSync(file) };
    };
    const svg = await save("Chart as SVG");
    expect(svg.name).toMatch(/\.svg$/);
    expect(svg.bytes.toString("utf8")).toMatch(/^<\?xml[^>]*>\s*<svg[^>]*xmlns="http:\/\/www\.w3\.org\/2000\/svg"/);
    expect(svg.bytes.toString("utf8")).toContain("Summer");
    const png = await save("Chart as PNG");
    expect(png.name).toMatch(/\.png$/);
    expect([...png.bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    const csv = await save("Table as CSV");
    expect(csv.bytes.toString("utf8").split("\r\n")[0]).toBe("site,hemisphere,year,season,local,stagnant,advective,unclassified,total,labels");

    await page.goto(`${app.url}/sites/${south.id}/export`);
    await page.getByRole("heading", { level: 1, name: "Export tagged evenings" }).waitFor();
    await page.getByLabel("Include every half-hour").check();
    await screenshot(page, "export-page");
    const zip = await save("Download zip");
    expect(zip.name).toBe("gloaming-synthetic-south-tower-2021-01-01_2022-12-31.zip");
    const files = await unzipBuffer(zip.bytes);
    expect([...files.keys()].map((n) => n.split("/").pop())).toEqual(["evenings.csv", "half-hours.csv", "provenance.json"]);
    const evenings = files.get([...files.keys()][0] ?? "")?.toString("utf8") ?? "";
    expect(evenings.split("\r\n").filter(Boolean)).toHaveLength(dates.length + 1);
    expect(evenings).toContain("'=checked by hand");
  });
});
