import { beforeAll, describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { chiSquareIndependence } from "@/lib/stats/chi-square";
import type { LabelKey } from "@/lib/ui/label-badge";
import { seasonOf } from "@/features/seasons/seasons";
import { seasonQuerySchema, type SeasonReport } from "@/features/seasons/schemas";
import { seasonReport } from "@/features/seasons/server/queries";
import { GET } from "@/app/api/seasons/route";
import { clientFor, createSiteFor, createUser, createUserWithGroup } from "@/tests/support/db";
import { datesBetween, insertEvenings } from "@/tests/features/seasons/evening-rows";

const LABELS: LabelKey[] = ["local", "stagnant", "advective", "unclassified"];
// A deterministic, season-dependent mix: stagnant evenings crowd into late summer (Jul-Aug).
function labelFor(date: string, i: number): LabelKey {
  const month = Number(date.slice(5, 7));
  if ((month === 7 || month === 8) && i % 3 !== 0) return "stagnant";
  return LABELS[(i * 7 + month) % 4] ?? "local";
}

describe("seasonOf", () => {
  test.each([
    // meteorological seasons, whole months (common practice)
    [2021, 1, 15, 47, "winter", 2021],
    [2021, 12, 1, 47, "winter", 2022],
    [2021, 3, 1, 47, "spring", 2021],
    [2021, 7, 31, 47, "summer", 2021],
    [2021, 11, 30, 47, "autumn", 2021],
    // south of the equator the names swap
    [2021, 1, 15, -35, "summer", 2021],
    [2021, 12, 1, -35, "summer", 2022],
    [2021, 4, 10, -35, "autumn", 2021],
    [2021, 7, 31, -35, "winter", 2021],
    [2021, 10, 1, -35, "spring", 2021],
  ])("%d-%d-%d at %d°", (y, m, d, lat, key, year) => {
    expect(seasonOf(y, m, d, lat, "meteorological")).toEqual({ key, year });
  });

  test("a custom season that wraps the new year counts in the year it ends", () => {
    const c = { name: "Wet season", start: "11-01", end: "03-31" };
    expect(seasonOf(2020, 11, 1, 0, "custom", c)).toEqual({ key: "in", year: 2021 });
    expect(seasonOf(2021, 3, 31, 0, "custom", c)).toEqual({ key: "in", year: 2021 });
    expect(seasonOf(2021, 4, 1, 0, "custom", c)).toEqual({ key: "out", year: 2021 });
  });
});

describe("season report against the database", () => {
  let lead: Awaited<ReturnType<typeof createUserWithGroup>>;
  let north: number;
  let south: number;

  beforeAll(async () => {
    lead = await createUserWithGroup({ role: "viewer" });
    north = (await createSiteFor(lead.group.id, { latitude: 47.2 })).id;
    south = (await createSiteFor(lead.group.id, { latitude: -35.4 })).id;
    const dates = datesBetween("2020-01-01", "2021-12-31");
    await insertEvenings(north, dates.map((date, i) => ({ date, auto: labelFor(date, i), final: i % 11 === 0 ? "advective" : undefined })));
    await insertEvenings(south, dates.map((date, i) => ({ date, auto: labelFor(date, i) })));
  });

  const report = (q: Record<string, string>) => seasonReport(lead.user, seasonQuerySchema.parse(q));
  const total = (r: SeasonReport, siteId: number | null, category: string, year: number | null = null) =>
    r.cells.find((c) => c.siteId === siteId && c.year === year && c.category === category);

  test("counts per season match a direct SQL count, final labels", async () => {
    const r = await report({ sites: String(north) });
    const [rows] = (await db.raw(
      `SELECT final_label AS label, COUNT(*) AS n FROM evenings
        WHERE site_id = ? AND MONTH(local_date) IN (6, 7, 8) GROUP BY final_label`,
      [north],
    )) as [Array<{ label: LabelKey; n: number }>];
    const summer = total(r, north, "summer");
    for (const label of LABELS) expect(summer?.counts[label]).toBe(Number(rows.find((x) => x.label === label)?.n ?? 0));
    expect(r.cells.filter((c) => c.year === null).reduce((a, c) => a + c.total, 0)).toBe(731);
  });

  test("automatic labels ignore overrides", async () => {
    const r = await report({ sites: String(north), labels: "auto" });
    const [[row]] = (await db.raw(
      `SELECT COUNT(*) AS n FROM evenings WHERE site_id = ? AND auto_label = 'advective' AND MONTH(local_date) IN (12, 1, 2)`,
      [north],
    )) as [[{ n: number }]];
    expect(total(r, north, "winter")?.counts.advective).toBe(Number(row.n));
    const final = await report({ sites: String(north) });
    expect(total(final, north, "winter")?.counts.advective).toBeGreaterThan(Number(row.n));
  });

  test("December counts in the next year's winter", async () => {
    const r = await report({ sites: String(north), from: "2020-12-01", to: "2020-12-31" });
    expect(total(r, north, "winter", 2021)?.total).toBe(31);
    expect(r.years).toEqual([2021]);
  });

  test("southern hemisphere: June-August is winter", async () => {
    const r = await report({ sites: `${north},${south}` });
    const [[row]] = (await db.raw(
      `SELECT COUNT(*) AS n FROM evenings WHERE site_id = ? AND final_label = 'stagnant' AND MONTH(local_date) IN (6, 7, 8)`,
      [south],
    )) as [[{ n: number }]];
    expect(total(r, south, "winter")?.counts.stagnant).toBe(Number(row.n));
    expect(r.sites.find((s) => s.id === south)?.hemisphere).toBe("south");
    // both sites together: their own seasons summed
    const both = total(r, null, "winter");
    expect(both?.total).toBe((total(r, north, "winter")?.total ?? 0) + (total(r, south, "winter")?.total ?? 0));
  });

  test("per month and custom season", async () => {
    const months = await report({ sites: String(north), scheme: "month", from: "2021-01-01", to: "2021-12-31" });
    expect(total(months, north, "02")?.total).toBe(28);
    const grow = await report({ sites: String(north), scheme: "custom", seasonStart: "04-01", seasonEnd: "09-30", from: "2021-01-01", to: "2021-12-31" });
    expect(total(grow, north, "in")?.total).toBe(183);
    expect(total(grow, north, "out")?.total).toBe(182);
  });

  test("the chi-square test uses the classified labels of all years and sites", async () => {
    const r = await report({ sites: String(north) });
    const table = (["local", "stagnant", "advective"] as const).map((l) =>
      r.categories.map((c) => total(r, north, c.key)?.counts[l] ?? 0),
    );
    const want = chiSquareIndependence(table);
    expect(r.test?.statistic).toBeCloseTo(want.statistic, 10);
    expect(r.test?.df).toBe(6);
    // stagnant evenings crowd into summer by construction: strongly dependent
    expect(r.test?.pValue).toBeLessThan(1e-6);
  });

  test("GET /api/seasons: viewer 200, other group 404, anonymous 401, bad query 422", async () => {
    const url = (q: string) => new Request(`http://localhost/api/seasons?${q}`);
    const viewer = await clientFor(lead.user);
    const ok = await viewer.call(() => GET(url(`sites=${north},${south}&from=2021-01-01&to=2021-12-31`)));
    expect(ok.status).toBe(200);
    const body = (await ok.json()) as SeasonReport;
    expect(body.sites.map((s) => s.id)).toEqual([north, south]);

    const stranger = await clientFor(await createUser());
    expect((await stranger.call(() => GET(url(`sites=${north}`)))).status).toBe(404);
    const other = await createUserWithGroup();
    const mixed = await clientFor(other.user);
    const otherSite = await createSiteFor(other.group.id);
    expect((await mixed.call(() => GET(url(`sites=${otherSite.id},${north}`)))).status).toBe(404);

    const anonymous = new (await import("@/tests/support/next")).FakeClient();
    expect((await anonymous.call(() => GET(url(`sites=${north}`)))).status).toBe(401);
    expect((await viewer.call(() => GET(url(`sites=${north}&from=2021-13-01`)))).status).toBe(422);
  });
});
