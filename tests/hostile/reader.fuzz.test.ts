/*
 * Fuzzing of the table reader (lib/series/reader.ts, recognize.ts, timestamps.ts): arbitrary
 * bytes, CSV-like text built from tower-file pieces, odd encodings, NUL bytes, CR-only line ends,
 * huge fields. Every input ends in a table that keeps the HalfHourTable promises, or in a
 * TableError with a message (and a line number where one applies); never another exception.
 * Runaway inputs (an unclosed quote, a file with no line break) are stopped by the reader's own
 * line-length limit, so no case can hang. All data is hand-made or random.
 */
import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { readTable, TableError, type ReadOptions } from "@/lib/series/reader";
import { parseTimestamp } from "@/lib/series/timestamps";
import { recognizeColumns, resolveColumns } from "@/lib/series/recognize";

const OPTS: ReadOptions = { utcOffsetHours: 1 };

type Outcome = { kind: "table"; rows: number; stamps: number[] } | { kind: "error"; row: number | null; message: string };

/** Feeds `bytes` in the given chunk sizes, so chunk boundaries fall anywhere. */
async function* chunked(bytes: Uint8Array, sizes: number[]): AsyncGenerator<Uint8Array> {
  let at = 0;
  let i = 0;
  while (at < bytes.length) {
    const n = Math.max(1, sizes.length ? (sizes[i++ % sizes.length] as number) : bytes.length);
    yield bytes.subarray(at, at + n);
    at += n;
  }
}

/** Reads and checks the invariants of whatever comes out. */
async function outcome(input: Uint8Array | string, sizes: number[] = [], options: ReadOptions = OPTS): Promise<Outcome> {
  const source = typeof input === "string" ? input : chunked(input, sizes);
  try {
    const { table, report } = await readTable(source, options);
    const n = table.startMs.length;
    expect(report.rows).toBe(n);
    expect(n).toBeGreaterThan(0);
    for (let i = 0; i < n; i++) {
      expect(Number.isFinite(table.startMs[i])).toBe(true);
      if (i > 0) expect(table.startMs[i]).toBeGreaterThan(table.startMs[i - 1] as number);
    }
    for (const col of Object.values(table.columns)) {
      expect(col?.length).toBe(n);
      for (const v of col ?? []) expect(Number.isNaN(v) || Number.isFinite(v)).toBe(true);
    }
    expect(Number.isFinite(table.periodMinutes) && table.periodMinutes > 0).toBe(true);
    for (const r of report.rejected) expect(r.row).toBeGreaterThanOrEqual(1);
    return { kind: "table", rows: n, stamps: Array.from(table.startMs) };
  } catch (err) {
    if (!(err instanceof TableError)) throw new Error(`not a TableError: ${err instanceof Error ? err.stack : String(err)}`);
    expect(err.message.trim().length).toBeGreaterThan(0);
    expect(err.message.length).toBeLessThan(2000);
    if (err.row !== null) expect(Number.isInteger(err.row) && err.row >= 1).toBe(true);
    return { kind: "error", row: err.row, message: err.message };
  }
}

const enc = new TextEncoder();

// Pieces of tower files, good and bad.
const headerName = fc.constantFrom("TIMESTAMP_START", "TIMESTAMP_END", "TIMESTAMP", "DATE", "TIME", "WS", "WD", "USTAR", "TA", "TA [K]", "PA (hPa)", "RH", "H", "LE", "SW_IN", "O3", "", " ", "WS", "<script>x</script>", "=cmd|' /C calc'!A0", "\u0000", "Ä°C", '"WS"', "a,b");
const stamp = fc.oneof(
  fc.date({ min: new Date("1990-01-01T00:00:00Z"), max: new Date("2099-12-31T00:00:00Z"), noInvalidDate: true }).map((d) => d.toISOString().slice(0, 16).replace(/[-T:]/g, "")),
  fc.date({ min: new Date("1990-01-01T00:00:00Z"), max: new Date("2099-12-31T00:00:00Z"), noInvalidDate: true }).map((d) => d.toISOString().slice(0, 16).replace("T", " ")),
  fc.constantFrom("202213450000", "2022-02-30 00:00", "24:00", "2022-06-01T24:00", "0", "-9999", "", "9".repeat(14), "2022-06-01 00:00+99"),
);
const cell = fc.oneof(
  { weight: 6, arbitrary: fc.double({ noNaN: false }).map(String) },
  { weight: 3, arbitrary: fc.integer({ min: -10_000, max: 10_000 }).map(String) },
  { weight: 3, arbitrary: stamp },
  { weight: 2, arbitrary: fc.constantFrom("-9999", "-9999.0", "NA", "NaN", "#N/A", "null", "", " ", "1,5", "1.2.3", "1e400", "-0", "0x1F", "Infinity", "\u0000", "\u00a0", '"', '""', '"1\n2"', "=1+2", "@SUM(A1)") },
  { weight: 1, arbitrary: fc.string({ maxLength: 30, unit: "binary" }) },
);

/** A CSV-like text: a header of tower names, rows of tower-ish cells, a delimiter and line end. */
const csvLike = fc
  .record({
    header: fc.array(headerName, { minLength: 1, maxLength: 8 }),
    rows: fc.array(fc.array(cell, { minLength: 0, maxLength: 9 }), { maxLength: 40 }),
    delim: fc.constantFrom(",", ";", "\t", "|"),
    eol: fc.constantFrom("\n", "\r\n", "\r"),
    bom: fc.boolean(),
    trailing: fc.boolean(),
  })
  .map(({ header, rows, delim, eol, bom, trailing }) => (bom ? "\uFEFF" : "") + [header, ...rows].map((r) => r.join(delim)).join(eol) + (trailing ? eol : ""));

/** A well-formed half-hourly file of `n` rows, start/end pair, so good cases can be compared. */
function goodFile(n: number, eol = "\n"): string {
  const lines = ["TIMESTAMP_START,TIMESTAMP_END,WS,TA,USTAR"];
  const t0 = Date.UTC(2022, 5, 1);
  const fmt = (ms: number) => new Date(ms + 3_600_000).toISOString().slice(0, 16).replace(/[-T:]/g, "");
  for (let i = 0; i < n; i++) lines.push(`${fmt(t0 + i * 1_800_000)},${fmt(t0 + (i + 1) * 1_800_000)},${(1 + (i % 7) / 10).toFixed(1)},${(12 + (i % 5)).toFixed(2)},0.3`);
  return lines.join(eol) + eol;
}

const RUNS = { numRuns: 300, seed: 6, endOnFailure: true } as const;

describe("table reader under hostile input", () => {
  test("arbitrary bytes in arbitrary chunks: a table or a TableError", async () => {
    await fc.assert(
      fc.asyncProperty(fc.uint8Array({ maxLength: 3000 }), fc.array(fc.integer({ min: 1, max: 700 }), { maxLength: 5 }), async (bytes, sizes) => {
        await outcome(bytes, sizes);
      }),
      RUNS,
    );
  });

  test("CSV-like text: a table or a TableError, the same whatever the chunking and parse path", { timeout: 120_000 }, async () => {
    // Random rows seldom form a readable file (3 tables in 300 runs), so half the runs damage a good
    // one. The reader holds back the first 16 kB whatever the chunking, so only longer files
    // (about 40 bytes a row) reach the chunk-boundary and fast-path code at all.
    const damagedGood = fc
      .record({
        n: fc.oneof(fc.integer({ min: 1, max: 40 }), fc.integer({ min: 450, max: 900 })),
        hits: fc.array(fc.tuple(fc.nat(), fc.integer({ min: 0, max: 4 }), cell), { maxLength: 6 }),
        delim: fc.constantFrom(",", ";", "\t"),
        eol: fc.constantFrom("\n", "\r\n", "\r"),
        bom: fc.boolean(),
      })
      .map(({ n, hits, delim, eol, bom }) => {
        const rows = goodFile(n).trimEnd().split("\n").map((l) => l.split(","));
        for (const [r, c, v] of hits) {
          const row = rows[1 + (r % n)];
          if (row) row[c] = v;
        }
        return (bom ? "\uFEFF" : "") + rows.map((r) => r.join(delim)).join(eol) + eol;
      });
    // Both kinds must occur, or the comparison of chunkings covers only one path of the reader.
    const seen = { table: 0, error: 0 };
    await fc.assert(
      fc.asyncProperty(fc.oneof(csvLike, damagedGood), fc.array(fc.integer({ min: 1, max: 97 }), { maxLength: 4 }), async (text, sizes) => {
        const bytes = enc.encode(text);
        const whole = await outcome(bytes);
        const pieces = await outcome(bytes, sizes);
        expect(pieces).toEqual(whole);
        const slow = await outcome(bytes, [], { ...OPTS, fastPath: false });
        expect(slow).toEqual(whole);
        seen[whole.kind] += 1;
      }),
      RUNS,
    );
    console.info(`[hostile] CSV-like runs: ${seen.table} tables, ${seen.error} errors`);
    expect(seen.table, "runs that gave a table").toBeGreaterThanOrEqual(10);
    expect(seen.error, "runs that gave a TableError").toBeGreaterThanOrEqual(10);
  });

  // Found by the fuzz above: past the first 16 kB the fast path split lines at LF only, so a
  // CR-only file ran together into a few long "lines" there and the empty timestamp went unseen.
  test("a long CR-only file with an empty timestamp is refused at its line, as with LF, whole and in chunks", async () => {
    const lines = goodFile(500).trimEnd().split("\n");
    lines[419] = `,${lines[419]?.split(",").slice(1).join(",")}`;
    const lf = await outcome(enc.encode(lines.join("\n") + "\n"));
    expect(lf).toMatchObject({ kind: "error", row: 420, message: expect.stringMatching(/cannot read the timestamp ""/) });
    const bytes = enc.encode(lines.join("\r") + "\r");
    expect(await outcome(bytes)).toEqual(lf);
    expect(await outcome(bytes, [50])).toEqual(lf);
    expect(await outcome(bytes, [4096])).toEqual(lf);
    expect(await outcome(bytes, [], { ...OPTS, fastPath: false })).toEqual(lf);
  });

  test("a long good file keeps every row past the first 16 kB with every line end, chunking and path", async () => {
    // 900 rows (about 36 kB): most lines go through the fast path, not the sniffed prefix.
    const lf = await outcome(goodFile(900));
    expect(lf).toMatchObject({ kind: "table", rows: 900 });
    const reference = await readTable(goodFile(900), OPTS);
    expect(reference.report.rejected).toEqual([]);
    for (const eol of ["\r\n", "\r"]) {
      const bytes = enc.encode(goodFile(900, eol));
      for (const sizes of [[], [50], [37, 4096]]) expect(await outcome(bytes, sizes), `${JSON.stringify(eol)} ${sizes.join("/")}`).toEqual(lf);
      expect(await outcome(bytes, [50], { ...OPTS, fastPath: false }), JSON.stringify(eol)).toEqual(lf);
      for (const fastPath of [true, false]) {
        const { table, report } = await readTable(chunked(bytes, [50]), { ...OPTS, fastPath });
        expect(table.columns, `${JSON.stringify(eol)} fastPath ${fastPath}`).toEqual(reference.table.columns);
        expect(report, `${JSON.stringify(eol)} fastPath ${fastPath}`).toEqual(reference.report);
      }
    }
  });

  test("a good file is read with every line end, and CR-only files are not one long line", async () => {
    const lf = await outcome(goodFile(200));
    expect(lf).toMatchObject({ kind: "table", rows: 200 });
    for (const eol of ["\r\n", "\r"]) {
      expect(await outcome(enc.encode(goodFile(200, eol)), [4096]), JSON.stringify(eol)).toEqual(lf);
      expect(await outcome(enc.encode(goodFile(200, eol)), [37]), JSON.stringify(eol)).toEqual(lf);
    }
  });

  test("UTF-16 with a byte-order mark is read like UTF-8", async () => {
    const lf = await outcome(goodFile(50));
    const text = goodFile(50);
    const le = new Uint8Array(2 + text.length * 2);
    const be = new Uint8Array(2 + text.length * 2);
    le.set([0xff, 0xfe]);
    be.set([0xfe, 0xff]);
    for (let i = 0; i < text.length; i++) {
      const c = text.charCodeAt(i);
      le[2 + 2 * i] = c & 0xff;
      le[3 + 2 * i] = c >> 8;
      be[2 + 2 * i] = c >> 8;
      be[3 + 2 * i] = c & 0xff;
    }
    expect(await outcome(le, [333])).toEqual(lf);
    expect(await outcome(be, [333])).toEqual(lf);
  });

  test("a Latin-1 file (degree sign in the units row) is read, with a warning about the encoding", async () => {
    const text = "TIMESTAMP,TA,WS\nYYYYMMDDHHMM,\u00b0C,m/s\n202206010030,12.5,1.0\n202206010100,12.4,1.1\n";
    const bytes = Uint8Array.from(text, (ch) => ch.charCodeAt(0));
    const { table, report } = await readTable(chunked(bytes, []), OPTS);
    expect(table.startMs.length).toBe(2);
    expect(table.columns.TA?.[0]).toBe(12.5);
    expect(report.warnings.join(" ")).toMatch(/not UTF-8.*Latin-1/);
  });

  test("NUL bytes in cells and headers give a table or a TableError", async () => {
    const text = goodFile(20).replace(/,0\.3/g, ",0.\u00003").replace("USTAR", "US\u0000TAR");
    expect((await outcome(enc.encode(text))).kind).toBe("table");
    expect((await outcome(enc.encode("\u0000".repeat(5000)))).kind).toBe("error");
  });

  test("an unclosed quote is stopped by the line-length limit with the line where it starts", async () => {
    const lines = goodFile(60_000).split("\n");
    lines[3] = `${lines[3]}"`;
    const res = await outcome(enc.encode(lines.join("\n")), [1 << 16]);
    expect(res).toMatchObject({ kind: "error" });
    expect((res as { message: string }).message).toMatch(/longer than/);
    expect((res as { row: number }).row).toBeGreaterThanOrEqual(2);
    expect((res as { row: number }).row).toBeLessThanOrEqual(5);
  });

  test("a file without a line break (10 MB on one line) is refused by the line-length limit", async () => {
    const bytes = new Uint8Array(10_000_000).fill(0x31);
    bytes.set(enc.encode("TIMESTAMP,WS,"), 0);
    const res = await outcome(bytes, [1 << 16]);
    expect(res).toMatchObject({ kind: "error", row: 1 });
    expect((res as { message: string }).message).toMatch(/longer than/);
  });

  test("huge fields below the limit are read as rejected cells, not as a failure", async () => {
    const text = goodFile(10).replace(/,0\.3\n/, `,${"7".repeat(200_000)}\n`);
    const { report } = await readTable(text, OPTS);
    expect(report.rejected.some((r) => r.column === "USTAR" && r.row === 2)).toBe(true);
  });

  test("timestamps and recognition never throw on arbitrary text", () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 200, unit: "binary" }), fc.integer({ min: -840, max: 840 }), (s, off) => {
        const v = parseTimestamp(s, off);
        expect(Number.isNaN(v) || Number.isFinite(v)).toBe(true);
      }),
      { numRuns: 2000, seed: 6 },
    );
    fc.assert(
      fc.property(fc.array(fc.oneof(headerName, fc.string({ maxLength: 40, unit: "binary" })), { maxLength: 30 }), fc.option(fc.array(fc.string({ maxLength: 20 }), { maxLength: 30 }), { nil: undefined }), (headers, units) => {
        resolveColumns(recognizeColumns(headers, units));
      }),
      { numRuns: 1000, seed: 6 },
    );
  });

  test("archives and documents are named, never unpacked", async () => {
    const cases: [number[], RegExp][] = [
      [[0x1f, 0x8b, 8, 0], /gzip/],
      [[0x50, 0x4b, 3, 4], /zip archive/],
      [[0x42, 0x5a, 0x68, 0x39], /bzip2/],
      [[0x25, 0x50, 0x44, 0x46, 0x2d], /PDF/],
      [[0xd0, 0xcf, 0x11, 0xe0], /\.xls/],
    ];
    for (const [head, re] of cases) {
      const res = await outcome(Uint8Array.from([...head, ...new Array(100).fill(65)]), [2]);
      expect(res).toMatchObject({ kind: "error", row: 1, message: expect.stringMatching(re) });
    }
  });

  test("a file with no line break at all is not called empty", async () => {
    const res = await outcome(enc.encode('{"rows":[1,2,3]}'));
    expect(res).toMatchObject({ kind: "error", message: expect.stringMatching(/no header/) });
  });

  test("decimal commas are read where the comma is not the delimiter, and reported", async () => {
    const text = "TIMESTAMP;TA;WS\n2022-06-01 00:30;12,5;1,25\n2022-06-01 01:00;12,4;0,9\n";
    for (const fastPath of [true, false]) {
      const { table, report } = await readTable(text, { ...OPTS, fastPath });
      expect(Array.from(table.columns.TA ?? [])).toEqual([12.5, 12.4]);
      expect(report.warnings.join(" ")).toMatch(/4 cells use a decimal comma/);
    }
  });

  test("rows in the future are rejected; a file of only such rows is refused", async () => {
    const notAfterMs = Date.UTC(2022, 5, 1, 12);
    const { table, report } = await readTable(goodFile(48), { ...OPTS, notAfterMs });
    expect(table.startMs.length).toBe(25);
    expect(report.rejected.filter((r) => r.reason === "starts in the future")).toHaveLength(23);
    await expect(readTable(goodFile(48), { ...OPTS, notAfterMs: Date.UTC(2000, 0, 1) })).rejects.toThrow(/every row starts in the future/);
  });

  test("years before 1900 are not read (Date.UTC would move 0022 to 1922)", () => {
    expect(parseTimestamp("002206010030", 0)).toBeNaN();
    expect(parseTimestamp("0022-06-01 00:30", 0)).toBeNaN();
    expect(parseTimestamp("1900-01-01 00:30", 0)).toBe(Date.UTC(1900, 0, 1, 0, 30));
  });

  test("an unreadable timestamp that swallowed later lines is shown by its start", async () => {
    const lines = goodFile(20).split("\n");
    lines[3] = `"${lines[3]}`;
    const res = await outcome(lines.join("\n"));
    expect(res).toMatchObject({ kind: "error", row: 4, message: expect.stringMatching(/quote left open/) });
    expect((res as { message: string }).message.length).toBeLessThan(300);
  });
});
