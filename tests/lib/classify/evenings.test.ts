import { describe, expect, test } from "vitest";
import { classifyTable, type EveningResult } from "@/lib/classify/evenings";
import { DERIVED_SIGMA_W, DERIVED_ZL } from "@/lib/classify/metrics";
import type { SiteParams } from "@/lib/classify/site";
import type { HalfHourTable } from "@/lib/series/types";
import { generateSynthetic, type SyntheticResult } from "@/lib/synthetic/generator";

// All tower data in these tests is SYNTHETIC (lib/synthetic), not measured at any site.

const MID: SiteParams = {
  latitudeDeg: 47.3,
  longitudeDeg: 8.5,
  elevationM: 450,
  measurementHeightM: 10,
  canopyHeightM: 0.5,
  utcOffsetHours: 1,
};

function agreement(results: EveningResult[], truth: SyntheticResult["truth"], classifiedOnly = false): number {
  const byDate = new Map(truth.map((t) => [t.date, t.kind]));
  let ok = 0;
  let total = 0;
  for (const r of results) {
    const kind = byDate.get(r.date);
    if (kind === undefined) continue;
    if (classifiedOnly && r.label === "unclassified") continue;
    total++;
    if (r.label === kind) ok++;
  }
  return total === 0 ? 0 : ok / total;
}

function slice(table: HalfHourTable, from: number, to: number): HalfHourTable {
  const columns: HalfHourTable["columns"] = {};
  for (const [k, v] of Object.entries(table.columns)) if (v) columns[k] = v.slice(from, to);
  return { ...table, startMs: table.startMs.slice(from, to), columns };
}

const twoYears = generateSynthetic({ site: MID, startDate: "2021-01-01", days: 730, seed: 7 });
const twoYearsResult = classifyTable(twoYears.table, MID);

describe("synthetic evenings of each kind", () => {
  test("two years at a mid-latitude site: one result per local date, >= 90 % agree with the truth", () => {
    expect(twoYearsResult.map((r) => r.date)).toEqual(twoYears.truth.map((t) => t.date));
    expect(agreement(twoYearsResult, twoYears.truth)).toBeGreaterThanOrEqual(0.9);
  });

  test.each(["local", "stagnant", "advective"] as const)("every kind is recognised: %s", (kind) => {
    const byDate = new Map(twoYears.truth.map((t) => [t.date, t.kind]));
    const ofKind = twoYearsResult.filter((r) => byDate.get(r.date) === kind);
    expect(ofKind.length).toBeGreaterThan(50);
    expect(ofKind.filter((r) => r.label === kind).length / ofKind.length).toBeGreaterThanOrEqual(0.9);
  });

  test("a labelled evening names its rule, and the rule's thresholds have positive margins", () => {
    const r = twoYearsResult.find((e) => e.label === "stagnant") as EveningResult;
    expect(r.rule).toBe("still-air");
    expect(r.margins.stillUstar).toBeGreaterThan(0);
    expect(r.margins.stillWind).toBeGreaterThan(0);
    expect(r.reasons[0]).toMatch(/^still-air: /);
    expect(r.reasons.some((s) => s.startsWith("ustarEvening "))).toBe(true);
    const local = twoYearsResult.find((e) => e.label === "local") as EveningResult;
    expect(local.rule).toBe("surface-cooling");
    expect(local.metrics.sigmaWDecay).toBeLessThan(0.7);
    expect(local.metrics.hZeroCrossingMinutes).not.toBeNull();
  });

  test("forced kinds per date come back as truth and are recognised", () => {
    const kinds = { "2021-07-01": "stagnant", "2021-07-02": "advective", "2021-07-03": "local" } as const;
    const g = generateSynthetic({ site: MID, startDate: "2021-06-30", days: 5, seed: 3, kinds });
    const r = classifyTable(g.table, MID);
    for (const [date, kind] of Object.entries(kinds)) {
      expect(g.truth.find((t) => t.date === date)?.kind).toBe(kind);
      expect(r.find((e) => e.date === date)?.label).toBe(kind);
    }
  });
});

describe("sites whose evening windows cross midnight UTC, data clocks in standard time", () => {
  test.each([
    ["150W, UTC-10", -150, 21.3, -10],
    ["120E, UTC+8", 120, 31.2, 8],
    ["75W, UTC-5 (UTC midnight falls at 19:00 local, inside the windows)", -75, 40.0, -5],
    ["179.5E, UTC+12", 179.5, -16.5, 12],
    ["179.8W, UTC-12", -179.8, -18, -12],
  ])("%s", (_d, lon, lat, offset) => {
    const site: SiteParams = { ...MID, latitudeDeg: lat, longitudeDeg: lon, utcOffsetHours: offset };
    const g = generateSynthetic({ site, startDate: "2022-03-01", days: 120, seed: 11 });
    const r = classifyTable(g.table, site);
    expect(r.map((e) => e.date)).toEqual(g.truth.map((t) => t.date));
    for (const e of r) {
      // the evening of local date D has its sunset in the local afternoon/evening of D
      const localSunset = new Date(Date.parse(e.sunsetUtc as string) + offset * 3_600_000);
      expect(localSunset.toISOString().slice(0, 10)).toBe(e.date);
      expect(localSunset.getUTCHours()).toBeGreaterThanOrEqual(16);
    }
    expect(agreement(r, g.truth)).toBeGreaterThanOrEqual(0.9);
  });
});

describe("edge cases", () => {
  const week = generateSynthetic({ site: MID, startDate: "2021-06-01", days: 7, seed: 5 });

  test("a table that starts mid-evening: the first evening is unclassified for afternoon coverage", () => {
    const full = classifyTable(week.table, MID);
    const sunset2 = Date.parse(full[1]?.sunsetUtc as string);
    const from = week.table.startMs.findIndex((t) => t >= sunset2);
    const r = classifyTable(slice(week.table, from, week.table.startMs.length), MID);
    expect(r[0]?.date).toBe("2021-06-02");
    expect(r[0]?.label).toBe("unclassified");
    expect(r[0]?.rule).toBeNull();
    expect(r[0]?.reasons.join(" ")).toMatch(/coverage of afternoon window 0 < 0\.5 \(W_SIGMA 0, USTAR 0, WS 0\)/);
    expect(r[1]?.label).not.toBe("unclassified");
  });

  test("a table that ends mid-evening: the last evening is unclassified for evening coverage", () => {
    const full = classifyTable(week.table, MID);
    const sunset = Date.parse(full[3]?.sunsetUtc as string);
    const to = week.table.startMs.findIndex((t) => t >= sunset + 90 * 60_000);
    const r = classifyTable(slice(week.table, 0, to), MID);
    const last = r[r.length - 1] as EveningResult;
    expect(last.date).toBe("2021-06-04");
    expect(last.label).toBe("unclassified");
    expect(last.reasons.join(" ")).toMatch(/coverage of evening window/);
  });

  test("gaps: a two-day hole gives coverage reasons; scattered gaps still classify", () => {
    const t = slice(week.table, 0, week.table.startMs.length);
    for (const col of Object.values(t.columns)) col?.fill(Number.NaN, 48 * 2, 48 * 4);
    const r = classifyTable(t, MID);
    expect(r[2]?.label).toBe("unclassified");
    expect(r[2]?.reasons[0]).toMatch(/coverage of afternoon window 0 < 0\.5/);
    const gappy = generateSynthetic({ site: MID, startDate: "2021-01-01", days: 365, seed: 9, gapFraction: 0.1 });
    const rg = classifyTable(gappy.table, MID);
    expect(agreement(rg, gappy.truth, true)).toBeGreaterThanOrEqual(0.9);
    expect(rg.filter((e) => e.label !== "unclassified").length).toBeGreaterThan(300);
  });

  test("calm evenings: no direction shift or sigma_theta is computed", () => {
    const t = slice(week.table, 0, week.table.startMs.length);
    (t.columns.WS as Float64Array).fill(0.3);
    const r = classifyTable(t, MID);
    for (const e of r) {
      expect(e.metrics.wdShiftDeg).toBeNull();
      expect(e.metrics.sigmaThetaEvening).toBeNull();
      expect(e.margins.turnedWind).toBeUndefined();
    }
  });

  test("missing W_SIGMA and ZL are derived, flagged, and the labels hold", () => {
    const g = generateSynthetic({ site: MID, startDate: "2021-01-01", days: 365, seed: 13, omit: ["W_SIGMA", "ZL"] });
    expect(g.table.columns.W_SIGMA).toBeUndefined();
    const r = classifyTable(g.table, MID);
    expect(r[10]?.metrics.derived).toEqual(expect.arrayContaining([DERIVED_ZL, DERIVED_SIGMA_W]));
    expect(r[10]?.metrics.sigmaWEvening).not.toBeNull();
    expect(r[10]?.metrics.zetaEvening).not.toBeNull();
    expect(agreement(r, g.truth)).toBeGreaterThanOrEqual(0.9);
    // measured columns are not flagged
    expect(twoYearsResult[10]?.metrics.derived).toEqual([]);
  });

  test("missing PA falls back to the standard atmosphere and says so", () => {
    const g = generateSynthetic({ site: MID, startDate: "2021-06-01", days: 3, seed: 1, omit: ["ZL", "PA"] });
    const r = classifyTable(g.table, MID);
    expect(r[1]?.metrics.derived.join(" ")).toMatch(/PA from elevation/);
  });

  test("no wind direction at all: the shift rule is skipped and said so", () => {
    const t = slice(week.table, 0, week.table.startMs.length);
    delete t.columns.WD;
    const r = classifyTable(t, MID);
    for (const e of r) expect(e.metrics.wdShiftDeg).toBeNull();
    const unmatched = r.find((e) => e.label === "unclassified");
    if (unmatched) expect(unmatched.reasons.join(" ")).toMatch(/wind-turned: wdShiftAbsDeg not available/);
  });

  test("an empty table gives no evenings; bad site parameters are a clear error", () => {
    const empty: HalfHourTable = { startMs: new Float64Array(0), periodMinutes: 30, columns: {}, units: {} };
    expect(classifyTable(empty, MID)).toEqual([]);
    expect(() => classifyTable(week.table, { ...MID, latitudeDeg: 95 })).toThrow(/latitude 95/);
    expect(() => classifyTable(week.table, { ...MID, canopyHeightM: 20 })).toThrow(/displacement height/);
  });
});

describe("polar sites", () => {
  const POLAR: SiteParams = { ...MID, latitudeDeg: 78.2, longitudeDeg: 15.6, utcOffsetHours: 1, canopyHeightM: 0.1, measurementHeightM: 3 };
  test("polar night and polar day are unclassified with the reason, sunset null", () => {
    const g = generateSynthetic({ site: POLAR, startDate: "2021-01-01", days: 365, seed: 2 });
    const r = classifyTable(g.table, POLAR);
    expect(r).toHaveLength(365);
    const jan = r.find((e) => e.date === "2021-01-05") as EveningResult;
    expect(jan.label).toBe("unclassified");
    expect(jan.sunsetUtc).toBeNull();
    expect(jan.civilDuskUtc).toBeNull();
    expect(jan.reasons).toEqual(["polar night: the Sun does not rise"]);
    const jun = r.find((e) => e.date === "2021-06-21") as EveningResult;
    expect(jun.reasons).toEqual(["polar day: the Sun does not set"]);
    expect(jun.rule).toBeNull();
    // near the polar fringe some evenings have no daytime afternoon reference
    expect(r.some((e) => e.reasons.some((s) => s.startsWith("short day")))).toBe(true);
    // where there is a full evening, labels still agree with the truth
    expect(agreement(r, g.truth, true)).toBeGreaterThanOrEqual(0.85);
  });
});
