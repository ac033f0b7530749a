import { describe, expect, test } from "vitest";
import { modifiedZ } from "@/lib/physics/robust";
import { DayGrid, detectAnomalies, medianAndMad, modifiedZScore, scorePeriod } from "@/lib/anomalies/detect";
import { anomalySettingsOf } from "@/lib/anomalies/settings";
import { DEFAULT_RULE_SET, parseRuleSet } from "@/lib/classify/rules";
import { generateSynthetic } from "@/lib/synthetic/generator";
import { eveningSun } from "@/lib/physics/sun";
import { cleanSeries, TEST_SITE } from "@/tests/support/anomaly-series";

const SETTINGS = anomalySettingsOf(DEFAULT_RULE_SET);

describe("modified z-score", () => {
  // Iglewicz & Hoaglin 1993, worked example (as quoted in domain.md): [1, 2, 3, 4, 100]
  const data = [1, 2, 3, 4, 100];
  const expected = [-1.349, -0.6745, 0, 0.6745, 65.43];

  test("the screen's median and MAD give the published scores", () => {
    const buf = Float64Array.from(data);
    const { med, mad } = medianAndMad(buf, data.length);
    expect(med).toBe(3);
    expect(mad).toBe(1);
    data.forEach((x, i) => expect(modifiedZScore(x, med, mad)).toBeCloseTo(expected[i] as number, 2));
  });

  test("agrees with lib/physics/robust modifiedZ", () => {
    const z = modifiedZ(data);
    expected.forEach((m, i) => expect(z[i]).toBeCloseTo(m, 2));
  });

  test("even-sized samples take the mean of the middle pair", () => {
    // common practice: median of an even count is the mean of the two middle values
    expect(medianAndMad(Float64Array.from([4, 1, 3, 2]), 4)).toEqual({ med: 2.5, mad: 1 });
  });
});

describe("baseline", () => {
  test("leaves the evening itself out", () => {
    // 15 days; at one half-hour of day the value is the day number, and the middle day holds 1000
    const days = 15;
    const startMs = Float64Array.from({ length: days * 48 }, (_, i) => Date.UTC(2022, 5, 1) + i * 1_800_000);
    const values = new Float64Array(days * 48).fill(0);
    const slot = 40;
    for (let d = 0; d < days; d++) values[d * 48 + slot] = d === 7 ? 1000 : d;
    const grid = new DayGrid(startMs, 30, [{ name: "X", values }]);
    const r = scorePeriod(grid, 0, 7 * 48 + slot, 7, 7);
    // others {0..6, 8..14}: median 7 (with the evening included it would be 8), MAD 4
    expect(r.baseline).toBe(7);
    expect(r.scale).toBeCloseTo(1.4826 * 4, 10);
    expect(r.value).toBe(1000);
    expect(r.score).toBeCloseTo((0.6745 * (1000 - 7)) / 4, 8);
  });

  test("gives no score with too few baseline days or a zero MAD", () => {
    const startMs = Float64Array.from({ length: 10 * 48 }, (_, i) => Date.UTC(2022, 5, 1) + i * 1_800_000);
    const values = new Float64Array(10 * 48).fill(5);
    const grid = new DayGrid(startMs, 30, [{ name: "X", values }]);
    expect(scorePeriod(grid, 0, 5 * 48, 7, 7).score).toBeNaN(); // MAD 0
    values.fill(Number.NaN);
    const sparse = new DayGrid(startMs, 30, [{ name: "X", values }]);
    expect(scorePeriod(sparse, 0, 5 * 48, 7, 7).baseline).toBeNaN();
  });
});

describe("detection on generated series with known truth", () => {
  const injected = ["2022-03-14", "2022-04-02", "2022-04-20", "2022-05-09", "2022-05-30", "2022-06-18"];
  const s = cleanSeries({
    startDate: "2022-03-01",
    days: 120,
    seed: 42,
    events: [
      ...injected.map((date) => ({ date, amplitude: 8 })),
      { date: "2022-04-11", amplitude: -8 },
      { date: "2022-05-20", amplitude: 15, fromH: 1.5, toH: 2 },
      { date: "2022-06-05", amplitude: 8, fromH: -1, toH: 0 },
    ],
  });
  const found = detectAnomalies(s.startMs, 30, [{ name: "O3", values: s.values }], s.evenings, SETTINGS);

  test("finds every injected post-sunset rise and nothing on clean evenings", () => {
    const rises = found.filter((a) => a.kind === "rise-after-sunset").map((a) => a.date);
    expect(rises).toEqual(injected);
    const truth = new Set([...injected, "2022-04-11", "2022-05-20", "2022-06-05"]);
    expect(found.filter((a) => !truth.has(a.date))).toEqual([]);
  });

  test("the run covers the injected hours and peaks above the threshold", () => {
    const a = found.find((x) => x.date === "2022-04-02");
    const sunset = s.evenings.find((e) => e.date === "2022-04-02")?.sunsetMs ?? 0;
    expect(a).toBeDefined();
    expect(a?.periods).toBeGreaterThanOrEqual(2);
    expect(a?.startMs).toBeGreaterThanOrEqual(sunset);
    expect(a?.endMs).toBeLessThanOrEqual(sunset + 3 * 3_600_000);
    expect(a?.peakScore).toBeGreaterThan(3.5);
  });

  test("tells drops, spikes and rises before sunset apart", () => {
    expect(found.find((a) => a.date === "2022-04-11")?.kind).toBe("drop");
    expect(found.find((a) => a.date === "2022-04-11")?.peakScore).toBeLessThan(-3.5);
    expect(found.find((a) => a.date === "2022-05-20")).toMatchObject({ kind: "spike", periods: 1 });
    expect(found.find((a) => a.date === "2022-06-05")?.kind).toBe("rise-before-sunset");
  });

  test("one half-hour beyond the threshold but below the spike score is not an anomaly", () => {
    const one = cleanSeries({
      startDate: "2022-03-01",
      days: 40,
      seed: 42,
      events: [{ date: "2022-03-20", amplitude: 5, fromH: 1.5, toH: 2 }],
    });
    const hits = detectAnomalies(
      one.startMs,
      30,
      [{ name: "O3", values: one.values }],
      one.evenings,
      SETTINGS,
    );
    expect(hits.filter((a) => a.date === "2022-03-20")).toEqual([]);
  });

  test("thresholds and windows come from the rule set", () => {
    const strict = anomalySettingsOf(
      parseRuleSet({
        ...DEFAULT_RULE_SET,
        anomalies: { threshold: 50, window: { startMinutes: 0, endMinutes: 240 } },
      }),
    );
    expect(strict.window).toEqual({ startMinutes: 0, endMinutes: 240 });
    expect(detectAnomalies(s.startMs, 30, [{ name: "O3", values: s.values }], s.evenings, strict)).toEqual(
      [],
    );
    // a rule set without the section keeps the defaults
    expect(SETTINGS).toMatchObject({
      threshold: 3.5,
      minConsecutive: 2,
      baselineHalfWidthDays: 10,
      window: { startMinutes: -60, endMinutes: 180 },
    });
  });
});

test("injected rises in the SYNTHETIC tower generator are found on their evenings", () => {
  const site = { ...TEST_SITE, elevationM: 780, measurementHeightM: 32, canopyHeightM: 21 };
  const dates = ["2023-02-11", "2023-04-23", "2023-06-30", "2023-08-08", "2023-10-17"];
  const r = generateSynthetic({
    site,
    startDate: "2023-01-01",
    days: 330,
    seed: 5,
    tracers: ["O3", "ISOPRENE"],
    injections: dates.map((date) => ({ date, column: "ISOPRENE", amplitude: 25 })),
  });
  const evenings = r.truth.map((t) => ({
    date: t.date,
    sunsetMs: eveningSun(t.date, site.latitudeDeg, site.longitudeDeg, 1).sunsetMs,
  }));
  const found = detectAnomalies(
    r.table.startMs,
    30,
    [{ name: "ISOPRENE", values: r.table.columns.ISOPRENE as Float64Array }],
    evenings,
    SETTINGS,
  );
  const rises = new Set(found.filter((a) => a.kind === "rise-after-sunset").map((a) => a.date));
  for (const d of dates) expect(rises.has(d)).toBe(true);
  // the generator's own evening-to-evening variety raises few flags besides
  expect(found.filter((a) => !dates.includes(a.date)).length).toBeLessThan(0.05 * evenings.length);
});
