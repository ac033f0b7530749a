import { describe, expect, test } from "vitest";
import { renderToStaticMarkup } from "react-dom/server";
import type { StoredAnomaly, StoredThreshold, WeakTurbulenceEvening } from "@/lib/anomalies/server/queries";
import {
  AnomalyTable,
  LabelCounts,
  UstarTable,
  WeakTurbulenceTable,
} from "@/features/anomalies/components/anomaly-tables";

/** The text of each cell, row by row (header row first), from rendered markup. */
function cells(html: string): string[][] {
  const text = (s: string) =>
    s
      .replace(/<[^>]+>/g, "")
      .replace(/&#x27;/g, "'")
      .replace(/&amp;/g, "&")
      .trim();
  return [...html.matchAll(/<tr[^>]*>(.*?)<\/tr>/g)].map((row) =>
    [...(row[1] ?? "").matchAll(/<t[hd][^>]*>(.*?)<\/t[hd]>/g)].map((c) => text(c[1] ?? "")),
  );
}

// Invented rows (synthetic); the figures only need to reach the right cells.
const anomaly: StoredAnomaly = {
  id: 7,
  series: "ISOPRENE",
  kind: "rise-after-sunset",
  start: "2023-07-08T19:30:00.000Z",
  end: "2023-07-08T21:00:00.000Z",
  peakScore: 6.25,
  peakValue: 31.04,
  baselineValue: 4.5,
  periods: 3,
  eveningId: 42,
  eveningDate: "2023-07-08",
  label: "stagnant",
  labelSource: "override",
  labelAtDetection: "local",
};

describe("anomaly tables", () => {
  test("label counts: one row per series and kind, a column per label with its glyph, and the total", () => {
    const html = renderToStaticMarkup(
      <LabelCounts
        counts={[
          { series: "O3", kind: "drop", label: "local", count: 2 },
          { series: "ISOPRENE", kind: "rise-after-sunset", label: "stagnant", count: 3 },
          { series: "ISOPRENE", kind: "rise-after-sunset", label: "advective", count: 1 },
        ]}
      />,
    );
    const rows = cells(html);
    expect(rows[0]).toEqual(["Series", "Kind", "L", "S", "A", "U", "All"]);
    expect(rows.slice(1).map((r) => [r[0], r[2], r[3], r[4], r[5], r[6]])).toEqual([
      ["ISOPRENE", "0", "3", "1", "0", "4"],
      ["O3", "2", "0", "0", "0", "2"],
    ]);
    // glyphs carry the label names for screen readers: never colour alone
    expect(html).toContain('aria-label="locally driven"');
    expect(html).toContain("<caption");
  });

  test("anomaly list: link to the evening, label with the override note, times and figures", () => {
    const html = renderToStaticMarkup(<AnomalyTable anomalies={[anomaly]} siteId={5} />);
    const rows = cells(html);
    expect(rows[0]).toEqual(["Evening", "Label", "Series", "Kind", "UTC", "Peak score", "Value / baseline"]);
    expect(rows[1]?.[0]).toBe("2023-07-08");
    expect(rows[1]?.[1]).toContain("stagnant");
    expect(rows[1]?.[1]).toContain("(override)");
    expect(rows[1]?.slice(4)).toEqual(["19:30–21:00", "6.3", "31.0 / 4.5"]);
    expect(html).toContain('href="/sites/5/evenings/42"');
  });

  test("u* thresholds: the annual row is marked as the one applied", () => {
    const t = (season: StoredThreshold["season"], thresholdMs: number): StoredThreshold => ({
      seasonYear: 2023,
      season,
      fluxSeries: "FC",
      thresholdMs,
      points: 900,
      temperatureClassesUsed: 4,
      bootstrap: { resamples: 100, found: 96, p05: 0.18, p50: 0.21, p95: 0.25, sd: 0.02 },
      computedAt: "2024-01-01T00:00:00.000Z",
    });
    const rows = cells(renderToStaticMarkup(<UstarTable thresholds={[t("summer", 0.2), t("year", 0.23)]} />));
    expect(rows[1]?.slice(1)).toEqual(["0.20", "0.18–0.25(96/100)", "900"]);
    expect(rows[2]?.[0]).toBe("2023 (applied: seasonal maximum)");
  });

  test("weak-turbulence nights: counts by label above the table", () => {
    const w: WeakTurbulenceEvening = {
      eveningId: 1,
      eveningDate: "2023-07-08",
      label: "local",
      fluxSeries: "FC",
      thresholdMs: 0.22,
      nightPeriods: 20,
      weakPeriods: 6,
      firstWeak: "2023-07-08T22:00:00.000Z",
      lastWeak: "2023-07-09T02:30:00.000Z",
    };
    const html = renderToStaticMarkup(
      <WeakTurbulenceTable
        evenings={[w]}
        byLabel={[{ label: "local", evenings: 1, weakPeriods: 6, nightPeriods: 20 }]}
      />,
    );
    expect(html).toContain("1 nights, 6 of 20 night flux half-hours");
    expect(cells(html)[1]).toEqual(["2023-07-08", "Llocally driven", "6 / 20", "0.22", "07-08 22:00–02:30"]);
  });

  test("empty inputs say so instead of an empty table", () => {
    expect(renderToStaticMarkup(<AnomalyTable anomalies={[]} siteId={1} />)).toContain("No anomalies match.");
    expect(renderToStaticMarkup(<UstarTable thresholds={[]} />)).toContain("No threshold yet");
  });
});
