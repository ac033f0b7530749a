import { describe, expect, test } from "vitest";
import { addMonths, keyTarget, monthRange, monthWeeks, weekdayIndex } from "@/features/review/calendar-grid";
import { binnedMedians, fitHinge } from "@/features/review/regime";
import { rankQueue, type QueueInput } from "@/features/review/queue";
import { DEFAULT_RULE_SET } from "@/lib/classify/rules";
import { rangeSchema } from "@/features/review/schemas";
import { SAMPLE_METRICS } from "@/tests/features/review/fixtures";

describe("calendar arithmetic (Gregorian calendar; weeks start on Monday, ISO 8601 - common practice)", () => {
  test.each([
    ["2024-06-01", 5], // a Saturday
    ["2024-02-29", 3], // leap day, a Thursday
    ["2023-01-01", 6], // a Sunday
  ])("weekday of %s is %i (Mon = 0)", (date, idx) => {
    expect(weekdayIndex(date)).toBe(idx);
  });

  test("June 2024 spans five week rows with 30 days", () => {
    const weeks = monthWeeks("2024-06");
    expect(weeks).toHaveLength(5);
    expect(weeks[0]?.slice(0, 5)).toEqual([null, null, null, null, null]);
    expect(weeks.flat().filter(Boolean)).toHaveLength(30);
    expect(monthRange("2024-02")).toEqual({ from: "2024-02-01", to: "2024-02-29" });
  });

  test.each([
    ["2024-06-30", "ArrowRight", "2024-07-01"],
    ["2024-06-03", "ArrowUp", "2024-05-27"],
    ["2024-06-05", "Home", "2024-06-03"],
    ["2024-06-05", "End", "2024-06-09"],
    ["2024-03-31", "PageUp", "2024-02-29"],
    ["2024-01-31", "PageDown", "2024-02-29"],
    ["2024-06-05", "x", null],
  ])("from %s, %s goes to %s", (from, key, to) => {
    expect(keyTarget(from, key)).toBe(to);
  });

  test("months roll over years", () => {
    expect(addMonths("2024-12", 1)).toBe("2025-01");
    expect(addMonths("2024-01", -13)).toBe("2022-12");
  });

  test("a range must be real dates, in order, and not too long", () => {
    expect(rangeSchema.safeParse({ from: "2024-01-01", to: "2024-12-31" }).success).toBe(true);
    expect(rangeSchema.safeParse({ from: "2024-02-30", to: "2024-03-01" }).success).toBe(false);
    expect(rangeSchema.safeParse({ from: "2024-03-01", to: "2024-02-01" }).success).toBe(false);
    expect(rangeSchema.safeParse({ from: "2020-01-01", to: "2024-01-01" }).success).toBe(false);
  });
});

describe("regime hinge fit (piecewise linear least squares; the hockey-stick shape of Sun et al. 2012)", () => {
  test("recovers the breakpoint of noise-free synthetic hinge data", () => {
    // synthetic: sigma_w = 0.05 + 0.01 WS below 3 m/s, slope 0.12 above
    const pts = Array.from({ length: 80 }, (_, i) => {
      const x = 0.1 * i;
      return { x, y: 0.05 + 0.01 * x + 0.11 * Math.max(0, x - 3) };
    });
    const fit = fitHinge(pts, 200);
    expect(fit).not.toBeNull();
    expect(fit!.breakX).toBeCloseTo(3, 1);
    expect(fit!.slopeBelow).toBeCloseTo(0.01, 3);
    expect(fit!.slopeAbove).toBeCloseTo(0.12, 3);
  });

  test("too few points or no steepening: no fit", () => {
    expect(fitHinge([{ x: 1, y: 1 }])).toBeNull();
    const flat = Array.from({ length: 40 }, (_, i) => ({ x: i * 0.2, y: 0.5 - 0.01 * Math.max(0, i * 0.2 - 4) }));
    expect(fitHinge(flat)).toBeNull();
  });

  test("binned medians", () => {
    const pts = [0.1, 0.2, 0.3, 0.6, 0.7, 0.8].map((x, i) => ({ x, y: i }));
    expect(binnedMedians(pts, 0.5)).toEqual([
      { x: 0.25, y: 1 },
      { x: 0.75, y: 4 },
    ]);
  });
});

describe("queue ranking", () => {
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

  test("unclassified, then the nearest to flipping, then reviewed and overridden", () => {
    const ranked = rankQueue(
      [
        row(1, { reviewed: true, margins: { decayedMixing: 0.001, stableLayer: 0.5 } }),
        row(2, {}),
        row(3, { autoLabel: "unclassified", label: "unclassified", rule: null, reasons: ["coverage of evening window 0.2 < 0.5"] }),
        row(4, { margins: { decayedMixing: 0.02, stableLayer: 0.5 } }),
        row(5, { source: "override", label: "stagnant" }),
      ],
      () => DEFAULT_RULE_SET,
    );
    expect(ranked.map((r) => r.id)).toEqual([3, 4, 2, 1, 5]);
    expect(ranked[0]?.why).toMatch(/^unclassified: coverage/);
    expect(ranked[1]?.why).toMatch(/decayedMixing/);
  });
});
