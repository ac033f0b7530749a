import { Readable } from "node:stream";
import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { readTable, TableError, type ReadOptions } from "@/lib/series/reader";

const H = 3_600_000;
const utc = (s: string): number => Date.parse(s);
const read = (text: string, options: Partial<ReadOptions> = {}) => readTable(text, { utcOffsetHours: 0, ...options });

async function fatal(text: string, options: Partial<ReadOptions> = {}): Promise<TableError> {
  try {
    await read(text, options);
  } catch (e) {
    if (e instanceof TableError) return e;
    throw e;
  }
  throw new Error("expected a TableError");
}

const pairCsv = [
  "TIMESTAMP_START,TIMESTAMP_END,WS,TA,PA,RH",
  "202006011800,202006011830,2.0,20.5,98.1,50",
  "202006011830,202006011900,1.5,-9999,98.0,NA",
  "202006011900,202006011930,,19.0,97.9,55",
].join("\n");

describe("readTable", () => {
  test("start/end pair, UTC offset, missing codes", async () => {
    const { table, report } = await read(pairCsv, { utcOffsetHours: 2 });
    expect(Array.from(table.startMs)).toEqual([utc("2020-06-01T16:00:00Z"), utc("2020-06-01T16:30:00Z"), utc("2020-06-01T17:00:00Z")]);
    expect(table.periodMinutes).toBe(30);
    expect(Array.from(table.columns.WS ?? [])).toEqual([2, 1.5, NaN]);
    expect(Array.from(table.columns.TA ?? [])).toEqual([20.5, NaN, 19]);
    expect(Array.from(table.columns.RH ?? [])).toEqual([50, NaN, 55]);
    expect(table.units).toMatchObject({ WS: "m s-1", TA: "degC", PA: "kPa", RH: "%" });
    expect(report.perColumn.TA).toMatchObject({ read: 2, missing: 1 });
    expect(report.perColumn.WS).toMatchObject({ read: 2, missing: 1 });
    expect(report.timestamp.convention).toBe("start-end pair");
    expect(report.rejected).toEqual([]);
  });

  test.each([-12, -9.5, -5, 0, 5.5, 12, 13, 14])("UTC offset %d h", async (offset) => {
    const { table } = await read(pairCsv, { utcOffsetHours: offset });
    expect(table.startMs[0]).toBe(utc("2020-06-01T18:00:00Z") - offset * H);
  });

  test("units row: hPa and K converted, values checked", async () => {
    const csv = ["TIMESTAMP_START,TIMESTAMP_END,TA,PA,VPD,WS", ",,K,hPa,kPa,km/h", "202001010000,202001010030,273.15,1013.25,1.2,36", "202001010030,202001010100,300,1000,0.5,18"].join("\n");
    const { table, report } = await read(csv);
    expect(report.unitsLine).toBe(2);
    expect(table.columns.TA?.[0]).toBeCloseTo(0, 10);
    expect(table.columns.TA?.[1]).toBeCloseTo(26.85, 10);
    expect(table.columns.PA?.[0]).toBeCloseTo(101.325, 10);
    expect(table.columns.PA?.[1]).toBeCloseTo(100, 10);
    expect(table.columns.VPD?.[0]).toBeCloseTo(12, 10);
    expect(table.columns.WS?.[0]).toBeCloseTo(10, 10);
    expect(report.converted.map((c) => [c.variable, c.from, c.to])).toEqual([
      ["TA", "K", "degC"],
      ["PA", "hPa", "kPa"],
      ["VPD", "kPa", "hPa"],
      ["WS", "km/h", "m/s"],
    ]);
  });

  test("units from names; pressure in Pa and temperature in K found from their size when undeclared", async () => {
    const csv = ["TIMESTAMP_START,TIMESTAMP_END,TA_K,PA (Pa),air_pressure,Tair", "202001010000,202001010030,283.15,101325,1013.25,290.15"].join("\n");
    const r1 = await read(csv, { mapping: { Tair: null, air_pressure: null } });
    expect(r1.table.columns.TA?.[0]).toBeCloseTo(10, 10);
    expect(r1.table.columns.PA?.[0]).toBeCloseTo(101.325, 10);
    const csv2 = ["TIMESTAMP_START,TIMESTAMP_END,air_pressure,Tair", "202001010000,202001010030,1013.25,290.15"].join("\n");
    const r2 = await read(csv2);
    expect(r2.table.columns.PA?.[0]).toBeCloseTo(101.325, 10);
    expect(r2.table.columns.TA?.[0]).toBeCloseTo(17, 10);
    expect(r2.report.converted.every((c) => c.inferred)).toBe(true);
  });

  test("an unknown unit leaves the column out and says so", async () => {
    const csv = ["TIMESTAMP_START,TIMESTAMP_END,TA,WS", ",,furlongs,m/s", "202001010000,202001010030,1,2"].join("\n");
    const { table, report } = await read(csv);
    expect(table.columns.TA).toBeUndefined();
    expect(report.warnings.join("\n")).toMatch(/furlongs/);
  });

  test("custom missing codes; numeric codes match their decimal spellings", async () => {
    const csv = ["TIMESTAMP_START,TIMESTAMP_END,WS,TA", "202001010000,202001010030,-9999.0,-6999", "202001010030,202001010100,x,-9999", "202001010100,202001010130,1,2"].join("\n");
    const a = await read(csv);
    expect(Array.from(a.table.columns.WS ?? [])).toEqual([NaN, NaN, 1]);
    // -6999 is no missing code by default: it is an impossible temperature, rejected.
    expect(a.report.rejected.map((r) => [r.row, r.column, r.value])).toEqual([
      [2, "TA", "-6999"],
      [3, "WS", "x"],
    ]);
    const b = await read(csv, { missingCodes: ["-6999", "x"], ranges: { WS: null } });
    expect(Array.from(b.table.columns.WS ?? [])).toEqual([-9999, NaN, 1]);
    expect(Array.from(b.table.columns.TA ?? [])).toEqual([NaN, NaN, 2]);
    expect(b.report.rejected.map((r) => [r.row, r.column, r.value])).toEqual([[3, "TA", "-9999"]]);
  });

  test("single timestamp marks the END by default, START on request", async () => {
    const csv = ["TIMESTAMP,WS", "2020-01-01 00:30,1", "2020-01-01 01:00,2"].join("\n");
    const end = await read(csv, { utcOffsetHours: 1 });
    expect(end.table.startMs[0]).toBe(utc("2019-12-31T23:00:00Z"));
    expect(end.report.timestamp.convention).toBe("single, marks end");
    expect(end.report.warnings.join(" ")).toMatch(/END/);
    const start = await read(csv, { utcOffsetHours: 1, timestampConvention: "start" });
    expect(start.table.startMs[0]).toBe(utc("2019-12-31T23:30:00Z"));
  });

  test("ISO 8601 with its own offset ignores the clock offset; TIMESTAMP_END alone is shifted back", async () => {
    const iso = ["TIMESTAMP_START,H", "2020-01-01T00:00:00+05:30,1", "2020-01-01T00:30:00+05:30,2"].join("\n");
    const a = await read(iso, { utcOffsetHours: -3 });
    expect(a.table.startMs[0]).toBe(utc("2019-12-31T18:30:00Z"));
    const endOnly = ["TIMESTAMP_END,H", "202001010030,1", "202001010100,2"].join("\n");
    const b = await read(endOnly);
    expect(b.table.startMs[0]).toBe(utc("2020-01-01T00:00:00Z"));
    expect(b.report.timestamp.convention).toBe("end");
  });

  test("date and time columns with a units row of brackets (processing-software layout)", async () => {
    const csv = ["file_info,x,y", "date,time,wind_speed,air_temperature,air_pressure", "[yyyy-mm-dd],[HH:MM],[m+1s-1],[K],[Pa]", "2020-01-01,00:30,1.5,280.15,100000", "2020-01-01,01:00,1.6,281.15,100100"].join("\n");
    const { table, report } = await read(csv);
    expect(report.headerLine).toBe(2);
    expect(report.unitsLine).toBe(3);
    expect(table.startMs[0]).toBe(utc("2020-01-01T00:00:00Z"));
    expect(table.columns.TA?.[0]).toBeCloseTo(7, 10);
    expect(table.columns.PA?.[1]).toBeCloseTo(100.1, 10);
  });

  test("logger layout: metadata line, header, units, processing line; quoted cells", async () => {
    const csv = ['"LOGGER","demo","synthetic"', '"TIMESTAMP","RECORD","WS_ms_Avg","WS","AirTC"', '"TS","RN","m/s","m/s","Deg C"', '"","","Avg","Avg","Smp"', '"2020-01-01 00:30:00",0,1.1,1.2,3.5', '"2020-01-01 01:00:00",1,1.3,1.4,3.4'].join("\r\n");
    const { table, report } = await read(csv, { mapping: { AirTC: "TA" }, timestampConvention: "end" });
    expect(report.headerLine).toBe(2);
    expect(report.unitsLine).toBe(3);
    expect(report.skippedLines).toEqual([4]);
    expect(Array.from(table.columns.WS ?? [])).toEqual([1.2, 1.4]);
    expect(Array.from(table.columns.TA ?? [])).toEqual([3.5, 3.4]);
  });

  test("semicolon-delimited file", async () => {
    const csv = ["TIMESTAMP_START;TIMESTAMP_END;WS", "202001010000;202001010030;1.5", "202001010030;202001010100;2.5"].join("\n");
    const { table, report } = await read(csv);
    expect(report.delimiter).toBe(";");
    expect(Array.from(table.columns.WS ?? [])).toEqual([1.5, 2.5]);
  });

  test("out-of-range cells become NaN and are reported with their line numbers", async () => {
    const csv = ["TIMESTAMP_START,TIMESTAMP_END,WS,WD,RH,TA,PA", "202001010000,202001010030,80,370,104,20,101", "202001010030,202001010100,1,359,106,-90,30", "202001010100,202001010130,-0.5,0,50,61,101"].join("\n");
    const { table, report } = await read(csv);
    expect(Array.from(table.columns.WS ?? [])).toEqual([NaN, 1, NaN]);
    expect(Array.from(table.columns.RH ?? [])).toEqual([104, NaN, 50]);
    expect(report.rejected.map((r) => [r.row, r.column, r.value])).toEqual([
      [2, "WS", "80"],
      [2, "WD", "370"],
      [3, "RH", "106"],
      [3, "TA", "-90"],
      [3, "PA", "30"],
      [4, "WS", "-0.5"],
      [4, "TA", "61"],
    ]);
    expect(report.perColumn.WS?.outOfRange).toBe(2);
    const custom = await read(csv, { ranges: { WS: null, TA: [-100, 100] } });
    expect(custom.table.columns.WS?.[0]).toBe(80);
    expect(custom.table.columns.TA?.[1]).toBe(-90);
  });

  test("duplicates keep the first, out-of-order rows are sorted, irregular steps and gaps reported", async () => {
    const csv = [
      "TIMESTAMP_START,TIMESTAMP_END,WS",
      "202001010000,202001010030,1", // line 2
      "202001010100,202001010130,3", // line 3
      "202001010030,202001010100,2", // line 4: out of order
      "202001010100,202001010130,9", // line 5: duplicate of line 3
      "202001010200,202001010230,5", // line 6: gap of one period
      "202001010215,202001010245,6", // line 7: irregular step
    ].join("\n");
    const { table, report } = await read(csv);
    expect(Array.from(table.columns.WS ?? [])).toEqual([1, 2, 3, 5, 6]);
    expect(report.duplicates).toBe(1);
    expect(report.rejected).toEqual([expect.objectContaining({ row: 5, reason: expect.stringContaining("line 3 kept") })]);
    expect(report.outOfOrder).toBe(1);
    expect(report.warnings.join("\n")).toMatch(/lines 4\b/);
    expect(report.gaps).toEqual({ count: 1, missingPeriods: 1 });
    expect(report.irregularSteps).toBe(1);
    expect(report.warnings.join("\n")).toMatch(/not a multiple of 30 min \(lines 7\)/);
  });

  test("explicit mapping overrides recognition and reads tracers in their declared unit", async () => {
    const csv = ["stamp,WS,wind2,O3", "202001010030,1,2,30.5", "202001010100,1,3,31"].join("\n");
    const { table, report } = await read(csv, { mapping: { stamp: "TIMESTAMP_END", wind2: "WS", O3: { variable: "O3", unit: "nmol mol-1" } } });
    expect(Array.from(table.columns.WS ?? [])).toEqual([2, 3]);
    expect(Array.from(table.columns.O3 ?? [])).toEqual([30.5, 31]);
    expect(table.units.O3).toBe("nmol mol-1");
    expect(report.ignored.map((i) => i.header)).toEqual(["WS"]);
  });

  test("fatal problems name the line", async () => {
    expect(await fatal("WS,TA\n1,2\n")).toMatchObject({ row: 1, message: expect.stringMatching(/timestamp/) });
    expect(await fatal("TIMESTAMP_START,foo,bar\n202001010000,1,2\n")).toMatchObject({ row: 1, message: expect.stringMatching(/no column recognised/) });
    expect(await fatal("")).toMatchObject({ row: 1, message: "the file is empty" });
    expect(await fatal("TIMESTAMP_START,WS\n")).toMatchObject({ message: expect.stringMatching(/no data rows/) });
    const bad = "TIMESTAMP_START,TIMESTAMP_END,WS\n202001010000,202001010030,1\n2020010100xx,202001010100,2\n";
    expect(await fatal(bad)).toMatchObject({ row: 3, message: expect.stringContaining('"2020010100xx" in column TIMESTAMP_START') });
    const skipped = await read(bad, { badTimestamp: "skip" });
    expect(skipped.report.rows).toBe(1);
    expect(skipped.report.rejected[0]?.row).toBe(3);
    expect(await fatal("a,b\n1,2\n", { mapping: { a: "TIMESTAMP", b: "WS", c: "TA" }, utcOffsetHours: 20 })).toMatchObject({ message: expect.stringMatching(/offset/) });
  });

  test("short and long rows: missing fields are missing, the rows are reported", async () => {
    const csv = ["TIMESTAMP_START,TIMESTAMP_END,WS,TA", "202001010000,202001010030,1", "202001010030,202001010100,2,3,4"].join("\n");
    const { table, report } = await read(csv);
    expect(Array.from(table.columns.TA ?? [])).toEqual([NaN, 3]);
    expect(report.perColumn.TA?.missing).toBe(1);
    expect(report.warnings.join("\n")).toMatch(/lines 2, 3/);
  });

  test("reads a Node stream of bytes with a byte-order mark and multi-byte characters split across chunks", async () => {
    const text = "\ufeffTIMESTAMP_START,TIMESTAMP_END,TA (°C),WS\n202001010000,202001010030,1.5,2\n";
    const bytes = Buffer.from(text, "utf8");
    const parts = [bytes.subarray(0, 3), ...Array.from({ length: bytes.length - 3 }, (_, i) => bytes.subarray(3 + i, 4 + i))];
    const { table, report } = await readTable(Readable.from(parts), { utcOffsetHours: 0 });
    expect(report.recognised.map((c) => c.name)).toEqual(["TA", "WS"]);
    expect(table.columns.TA?.[0]).toBe(1.5);
  });
});

/** A generated file with the oddities readers meet: gaps, codes, text, blanks, exponents. */
function oddFile(cells: string[][]): string {
  const lines = ["TIMESTAMP_START,TIMESTAMP_END,WS,TA,PA,H,O3"];
  const t0 = Date.UTC(2021, 2, 1);
  cells.forEach((row, i) => {
    const s = new Date(t0 + i * 1_800_000).toISOString();
    const e = new Date(t0 + (i + 1) * 1_800_000).toISOString();
    const stamp = (x: string) => x.slice(0, 4) + x.slice(5, 7) + x.slice(8, 10) + x.slice(11, 13) + x.slice(14, 16);
    lines.push([stamp(s), stamp(e), ...row].join(","));
  });
  return `${lines.join("\n")}\n`;
}

const cellArb = fc.oneof(
  fc.double({ min: -600, max: 1600, noNaN: true }).map((v) => String(v)),
  fc.integer({ min: -1000, max: 1000 }).map((v) => (v / 100).toFixed(2)),
  fc.constantFrom("-9999", "-9999.0", "NA", "NaN", "", " 1.5", "1e2", "2.5E-1", "+3", "-0", ".5", "5.", "abc", "1.2.3", "-", "123456789012345678", "0.1234567890123456789", "Infinity"),
);
const PLAIN = Array.from({ length: 400 }, (_, i) => [String(i % 9), "12.25", "99.5", String(i % 50), "40.125"]);
const rowsArb = fc.array(fc.array(cellArb, { minLength: 4, maxLength: 6 }), { minLength: 1, maxLength: 400 });
const stripUndefined = (x: unknown) => JSON.parse(JSON.stringify(x, (_k, v: unknown) => (typeof v === "number" && Number.isNaN(v) ? "NaN" : v instanceof Float64Array ? Array.from(v) : v))) as unknown;

describe("streaming and the fast path", () => {
  test("any chunking, and the quote-free fast path, give the papaparse result", async () => {
    await fc.assert(
      fc.asyncProperty(rowsArb, fc.array(fc.integer({ min: 1, max: 5000 }), { minLength: 1, maxLength: 30 }), async (rows, cuts) => {
        // Plain rows first: the first 16 kB go through papaparse, the odd rows then reach the fast path.
        const text = oddFile([...PLAIN, ...rows]);
        const opts: ReadOptions = { utcOffsetHours: 1, mapping: { O3: "O3" } };
        const whole = await readTable(text, { ...opts, fastPath: false });
        // Chunks of random sizes; the first is held back until 16 kB, so use a long file too.
        const chunks: string[] = [];
        let pos = 0;
        for (let i = 0; pos < text.length; i++) {
          const len = cuts[i % cuts.length] as number;
          chunks.push(text.slice(pos, pos + len));
          pos += len;
        }
        const streamed = await readTable(Readable.from(chunks), { ...opts, fastPath: true });
        expect(stripUndefined(streamed)).toEqual(stripUndefined(whole));
      }),
      { numRuns: 60 },
    );
  });

  test("a long file read in small chunks equals one chunk, with and without the fast path", async () => {
    const rows = Array.from({ length: 3000 }, (_, i) => [String((i % 70) / 7), i % 13 === 0 ? "-9999" : String(10 + (i % 20) / 4), "98.5", i % 17 === 0 ? "NA" : String(i % 300), String(i / 3)]);
    const text = oddFile(rows);
    const opts: ReadOptions = { utcOffsetHours: -5, mapping: { O3: "O3" } };
    const one = await readTable(text, { ...opts, fastPath: false });
    for (const size of [7, 100, 4096]) {
      const chunks = Array.from({ length: Math.ceil(text.length / size) }, (_, i) => Buffer.from(text.slice(i * size, (i + 1) * size)));
      for (const fastPath of [true, false]) {
        const r = await readTable(Readable.from(chunks), { ...opts, fastPath });
        expect(stripUndefined(r)).toEqual(stripUndefined(one));
      }
    }
    expect(one.report.rows).toBe(3000);
  });
});
