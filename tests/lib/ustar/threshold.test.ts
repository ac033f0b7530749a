import { describe, expect, test } from "vitest";
import { ustarThresholds } from "@/lib/ustar/threshold";
import { nightMask } from "@/lib/ustar/night";
import { monthsOfSeason, seasonOfDate } from "@/lib/ustar/seasons";
import { weakTurbulenceByEvening } from "@/lib/ustar/flags";
import { generateSynthetic } from "@/lib/synthetic/generator";
import { fluxWithThreshold, TEST_SITE } from "@/tests/support/anomaly-series";

describe("moving-point u* threshold (Reichstein et al. 2005; Papale et al. 2006)", () => {
  test.each([0.1, 0.2, 0.25])("recovers a known threshold of %s m/s within 0.05 m/s", (known) => {
    const d = fluxWithThreshold({ days: 365, seed: 11, thresholdMs: known });
    const r = ustarThresholds(
      { ...d, utcOffsetHours: 1, latitudeDeg: TEST_SITE.latitudeDeg },
      { bootstrap: 20 },
    );
    const seasonal = r.seasons.filter((s) => s.seasonYear === 2021);
    expect(seasonal.map((s) => s.season)).toEqual(["winter", "spring", "summer", "autumn"]);
    for (const s of seasonal) {
      expect(s.thresholdMs).not.toBeNull();
      expect(Math.abs((s.thresholdMs as number) - known)).toBeLessThan(0.05);
      expect(s.temperatureClassesUsed).toBe(6);
    }
    const annual = r.annual.find((a) => a.seasonYear === 2021);
    expect(annual?.thresholdMs).toBe(Math.max(...seasonal.map((s) => s.thresholdMs as number)));
    expect(Math.abs((annual?.thresholdMs as number) - known)).toBeLessThan(0.05);
  });

  test("recovers the known threshold of the SYNTHETIC tower generator", () => {
    const site = { ...TEST_SITE, elevationM: 780, measurementHeightM: 32, canopyHeightM: 21 };
    const g = generateSynthetic({
      site,
      startDate: "2023-01-01",
      days: 365,
      seed: 3,
      ustarThresholdMs: 0.25,
    });
    const c = g.table.columns;
    const night = nightMask(g.table.startMs, 30, c.SW_IN, site.latitudeDeg, site.longitudeDeg);
    const r = ustarThresholds(
      {
        startMs: g.table.startMs,
        ustar: c.USTAR as Float64Array,
        flux: c.FC as Float64Array,
        ta: c.TA as Float64Array,
        night,
        utcOffsetHours: 1,
        latitudeDeg: site.latitudeDeg,
      },
      { bootstrap: 20 },
    );
    const annual = r.annual.find((a) => a.seasonYear === 2023);
    expect(Math.abs((annual?.thresholdMs as number) - 0.25)).toBeLessThan(0.05);
  });

  test("bootstrap uncertainty is seeded, ordered and brackets the estimate", () => {
    const d = fluxWithThreshold({ days: 365, seed: 5, thresholdMs: 0.2 });
    const input = { ...d, utcOffsetHours: 1, latitudeDeg: TEST_SITE.latitudeDeg };
    const a = ustarThresholds(input, { bootstrap: 50 });
    const b = ustarThresholds(input, { bootstrap: 50 });
    expect(a).toEqual(b);
    for (const s of a.seasons) {
      const u = s.uncertainty;
      expect(u.resamples).toBe(50);
      expect(u.found).toBeGreaterThan(40);
      expect(u.p05 as number).toBeLessThanOrEqual(u.p50 as number);
      expect(u.p50 as number).toBeLessThanOrEqual(u.p95 as number);
      expect(u.sd as number).toBeGreaterThan(0);
      expect(Math.abs((u.p50 as number) - 0.2)).toBeLessThan(0.05);
    }
  });

  test("no data, no thresholds", () => {
    const r = ustarThresholds(
      {
        startMs: new Float64Array(0),
        ustar: new Float64Array(0),
        flux: new Float64Array(0),
        ta: new Float64Array(0),
        night: new Uint8Array(0),
        utcOffsetHours: 0,
        latitudeDeg: 45,
      },
      { bootstrap: 5 },
    );
    expect(r).toEqual({ seasons: [], annual: [] });
  });
});

describe("seasons and night", () => {
  test.each([
    ["2021-12-15", 46, "winter", 2022],
    ["2021-01-15", 46, "winter", 2021],
    ["2021-07-01", 46, "summer", 2021],
    ["2021-07-01", -34, "winter", 2021],
    ["2021-10-01", -34, "spring", 2021],
  ] as const)(
    "%s at latitude %s is %s of %s (meteorological seasons, common practice)",
    (date, lat, season, year) => {
      expect(seasonOfDate(date, lat)).toEqual({ season, seasonYear: year });
    },
  );

  test("months of a season", () => {
    expect(monthsOfSeason("winter", 46)).toEqual([0, 1, 11]);
    expect(monthsOfSeason("winter", -34)).toEqual([5, 6, 7]);
  });

  test("SW_IN below 10 W/m2 is night; where SW_IN is missing the Sun decides", () => {
    // 2022-06-21 at 46.9N 7.64E: the Sun is up at 12:00 UTC and down at 23:00 UTC
    const startMs = Float64Array.from([
      Date.UTC(2022, 5, 21, 12),
      Date.UTC(2022, 5, 21, 12),
      Date.UTC(2022, 5, 21, 23),
      Date.UTC(2022, 5, 21, 12),
    ]);
    const sw = Float64Array.from([500, 5, Number.NaN, Number.NaN]);
    expect([...nightMask(startMs, 30, sw, 46.9, 7.64)]).toEqual([0, 1, 1, 0]);
  });
});

test("weak-turbulence flags count a night's flux periods below the threshold", () => {
  const t0 = Date.UTC(2022, 5, 1, 19);
  const startMs = Float64Array.from({ length: 10 }, (_, i) => t0 + i * 1_800_000);
  const ustar = Float64Array.from([0.3, 0.05, 0.08, 0.3, Number.NaN, 0.02, 0.4, 0.1, 0.1, 0.1]);
  const flux = Float64Array.from([1, 1, 1, 1, 1, Number.NaN, 1, 1, 1, 1]);
  const night = Uint8Array.from([0, 1, 1, 1, 1, 1, 1, 1, 1, 1]);
  const flags = weakTurbulenceByEvening(startMs, ustar, flux, night, [t0, t0 + 3 * 3_600_000], () => 0.15);
  expect(flags).toEqual([
    {
      eveningIndex: 0,
      thresholdMs: 0.15,
      nightPeriods: 3,
      weakPeriods: 2,
      firstWeakMs: t0 + 1_800_000,
      lastWeakMs: t0 + 3_600_000,
    },
    {
      eveningIndex: 1,
      thresholdMs: 0.15,
      nightPeriods: 4,
      weakPeriods: 3,
      firstWeakMs: t0 + 7 * 1_800_000,
      lastWeakMs: t0 + 9 * 1_800_000,
    },
  ]);
});
