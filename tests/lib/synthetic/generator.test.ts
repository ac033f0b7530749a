import { describe, expect, test } from "vitest";
import type { SiteParams } from "@/lib/classify/site";
import { formatStamp, syntheticCsvChunks, tableCsvChunks, tableToCsv } from "@/lib/synthetic/csv";
import { SYNTHETIC_COLUMNS, generateSynthetic, generateSyntheticBlocks } from "@/lib/synthetic/generator";

const SITE: SiteParams = { latitudeDeg: 47.3, longitudeDeg: 8.5, elevationM: 450, measurementHeightM: 10, canopyHeightM: 0.5, utcOffsetHours: 1 };

describe("synthetic generator", () => {
  test("deterministic from the seed; another seed differs", () => {
    const a = generateSynthetic({ site: SITE, startDate: "2021-03-01", days: 10, seed: 1 });
    const b = generateSynthetic({ site: SITE, startDate: "2021-03-01", days: 10, seed: 1 });
    const c = generateSynthetic({ site: SITE, startDate: "2021-03-01", days: 10, seed: 2 });
    expect(a.synthetic).toBe(true);
    expect(Array.from(a.table.columns.H as Float64Array)).toEqual(Array.from(b.table.columns.H as Float64Array));
    expect(a.truth).toEqual(b.truth);
    expect(Array.from(a.table.columns.H as Float64Array)).not.toEqual(Array.from(c.table.columns.H as Float64Array));
  });

  test("blocks concatenate to the whole", () => {
    const opts = { site: SITE, startDate: "2021-03-01", days: 25, seed: 4 };
    const whole = generateSynthetic(opts);
    const parts = [...generateSyntheticBlocks(opts, 7)];
    expect(parts).toHaveLength(4);
    const ws = parts.flatMap((p) => Array.from(p.table.columns.WS as Float64Array));
    expect(ws).toEqual(Array.from(whole.table.columns.WS as Float64Array));
    expect(parts.flatMap((p) => p.truth)).toEqual(whole.truth);
  });

  test("half-hourly rows from local midnight, the trade's columns in canonical units, physical ranges", () => {
    const g = generateSynthetic({ site: SITE, startDate: "2021-06-01", days: 30, seed: 8, tracers: ["O3"] });
    const t = g.table;
    expect(t.startMs.length).toBe(30 * 48);
    expect(t.startMs[0]).toBe(Date.parse("2021-05-31T23:00:00Z"));
    expect(Object.keys(t.columns)).toEqual([...SYNTHETIC_COLUMNS, "O3"]);
    const range = (name: string) => {
      const a = Array.from(t.columns[name] as Float64Array);
      return [Math.min(...a), Math.max(...a)];
    };
    expect(range("SW_IN")[0]).toBe(0);
    expect(range("SW_IN")[1]).toBeLessThan(1200);
    expect(range("RH")[1]).toBeLessThanOrEqual(100);
    expect(range("WD")[0]).toBeGreaterThanOrEqual(0);
    expect(range("WD")[1]).toBeLessThan(360);
    expect(range("USTAR")[0]).toBeGreaterThan(0);
    expect(range("PA")[0]).toBeGreaterThan(90);
    expect(range("PA")[1]).toBeLessThan(100);
    // H is positive around local noon and negative at local midnight
    expect((t.columns.H as Float64Array)[24]).toBeGreaterThan(50);
    expect((t.columns.H as Float64Array)[47]).toBeLessThan(0);
  });

  test("gaps and omitted columns", () => {
    const g = generateSynthetic({ site: SITE, startDate: "2021-06-01", days: 20, seed: 8, gapFraction: 0.2, omit: ["ZL"] });
    expect(g.table.columns.ZL).toBeUndefined();
    const h = Array.from(g.table.columns.H as Float64Array);
    const missing = h.filter(Number.isNaN).length / h.length;
    expect(missing).toBeGreaterThan(0.15);
    expect(missing).toBeLessThan(0.25);
  });
});

describe("CSV writer", () => {
  test("TIMESTAMP_START/END in local standard time, -9999 for missing", () => {
    const g = generateSynthetic({ site: SITE, startDate: "2021-06-01", days: 1, seed: 8, gapFraction: 0.3 });
    const csv = tableToCsv(g.table, { utcOffsetHours: 1, columns: ["WS", "H"] });
    const lines = csv.trimEnd().split("\n");
    expect(lines[0]).toBe("TIMESTAMP_START,TIMESTAMP_END,WS,H");
    expect(lines).toHaveLength(49);
    expect(lines[1]).toMatch(/^202106010000,202106010030,/);
    expect(lines[48]).toMatch(/^202106012330,202106020000,/);
    expect(csv).toContain("-9999");
    expect(formatStamp(Date.parse("2021-12-31T23:30:00Z"), -5)).toBe("202112311830");
  });

  test("streams in chunks and the streamed synthetic file equals the table written at once", () => {
    const opts = { site: SITE, startDate: "2021-01-01", days: 40, seed: 5 };
    const chunks = [...syntheticCsvChunks(opts)];
    expect(chunks.length).toBeGreaterThan(2);
    const whole = [...tableCsvChunks(generateSynthetic(opts).table, { utcOffsetHours: 1, rowsPerChunk: 100 })].join("");
    expect(chunks.join("")).toBe(whole);
    expect(chunks.join("").split("\n").filter((l) => l.startsWith("TIMESTAMP_START"))).toHaveLength(1);
  });
});
