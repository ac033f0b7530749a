import { describe, expect, test } from "vitest";
import { DEFAULT_RULE_SET } from "@/lib/classify/rules";
import { ANOMALY_WEIGHT, WEAK_TURBULENCE_WEIGHT, rankQueue, type QueueInput } from "@/features/review/queue";
import { describeFlags, flagsByDate, type AnomalyMark, type WeakMark } from "@/features/review/flags";
import { SAMPLE_METRICS } from "@/tests/features/review/fixtures";

// Margins and flags below are invented round numbers (synthetic), not measurements.
const row = (id: number, over: Partial<QueueInput>): QueueInput => ({
  id,
  date: `2024-06-${String(id).padStart(2, "0")}`,
  label: "local",
  autoLabel: "local",
  source: "auto",
  reviewed: false,
  version: 1,
  rule: "surface-cooling",
  reasons: [],
  margins: { decayedMixing: 0.3, stableLayer: 0.5 },
  metrics: SAMPLE_METRICS,
  ...over,
});

const anomaly = (date: string, series: string, kind: AnomalyMark["kind"]): AnomalyMark => ({
  series,
  kind,
  start: `${date}T20:00:00.000Z`,
  end: `${date}T21:00:00.000Z`,
  peakScore: 6,
  eveningDate: date,
  label: "stagnant",
});

const weakNight = (date: string, weakPeriods: number): WeakMark => ({
  eveningDate: date,
  label: "stagnant",
  fluxSeries: "FC",
  thresholdMs: 0.25,
  weakPeriods,
  nightPeriods: 16,
});

describe("flags of an evening", () => {
  test("anomalies are grouped by series and kind, weak turbulence says how many night half-hours", () => {
    const flags = flagsByDate(
      [
        anomaly("2024-06-02", "CO2", "rise-after-sunset"),
        anomaly("2024-06-02", "CO2", "rise-after-sunset"),
        anomaly("2024-06-02", "O3", "drop"),
      ],
      [weakNight("2024-06-02", 5), weakNight("2024-06-03", 0)],
    );
    expect(describeFlags(flags.get("2024-06-02"))).toBe(
      "3 anomalies: CO2 rise after sunset ×2, O3 drop; weak turbulence: 5 of 16 night half-hours of FC under u* 0.25 m/s",
    );
    // a night without weak periods is no flag
    expect(flags.has("2024-06-03")).toBe(false);
    expect(describeFlags(undefined)).toBeNull();
  });
});

describe("queue ranking with anomalies and weak turbulence", () => {
  const flags = flagsByDate(
    [anomaly("2024-06-02", "CO2", "rise-after-sunset"), anomaly("2024-06-02", "CO2", "spike")],
    [weakNight("2024-06-03", 4), weakNight("2024-06-05", 3)],
  );
  const withFlags = (r: QueueInput): QueueInput => ({ ...r, flags: flags.get(r.date) });

  test("an evening with anomalies comes before a closer call without, and says why first", () => {
    const ranked = rankQueue(
      [
        // a close call (margin 0.02) without flags against wider margins (0.3)
        row(1, { margins: { decayedMixing: 0.02, stableLayer: 0.5 } }),
        row(2, {}),
        row(4, {}),
      ].map(withFlags),
      () => DEFAULT_RULE_SET,
    );
    expect(ranked.map((r) => r.id)).toEqual([2, 1, 4]);
    expect(ranked[0]?.why).toMatch(/^2 anomalies: CO2 rise after sunset, CO2 spike; \d+ % from flipping/);
    expect(ranked[0]?.anomalyCount).toBe(2);
    expect(ranked[1]?.anomalyCount).toBe(0);
  });

  test("the bonus is the documented weight on the need", () => {
    const [plain] = rankQueue([row(4, {})], () => DEFAULT_RULE_SET);
    const [anom] = rankQueue([withFlags(row(2, {}))], () => DEFAULT_RULE_SET);
    const [weak] = rankQueue([withFlags(row(3, {}))], () => DEFAULT_RULE_SET);
    expect(plain!.need - anom!.need).toBeCloseTo(ANOMALY_WEIGHT, 12);
    expect(plain!.need - weak!.need).toBeCloseTo(WEAK_TURBULENCE_WEIGHT, 12);
    expect(weak?.weakTurbulence).toBe(true);
    expect(weak?.why).toMatch(/^weak turbulence: 4 of 16 night half-hours of FC under u\* 0\.25 m\/s; /);
  });

  test("anomalies come before weak turbulence alone; unclassified with anomalies leads", () => {
    const ranked = rankQueue(
      [
        row(3, {}),
        row(2, {}),
        row(4, {}),
        row(2, { id: 9, autoLabel: "unclassified", label: "unclassified", rule: null, reasons: ["coverage of evening window 0.2 < 0.5"] }),
      ].map(withFlags),
      () => DEFAULT_RULE_SET,
    );
    expect(ranked.map((r) => r.id)).toEqual([9, 2, 3, 4]);
    expect(ranked[0]?.why).toMatch(/^2 anomalies: .*; unclassified: coverage/);
  });

  test("a reviewed or overridden evening stays behind every unreviewed one, flags or not", () => {
    const ranked = rankQueue(
      [row(2, { reviewed: true }), row(5, { source: "override", label: "stagnant" }), row(4, {})].map(withFlags),
      () => DEFAULT_RULE_SET,
    );
    expect(ranked.map((r) => r.id)).toEqual([4, 2, 5]);
    expect(ranked[1]?.why).toMatch(/^reviewed; 2 anomalies/);
    expect(ranked[2]?.why).toMatch(/^overridden by a person; weak turbulence/);
  });
});
