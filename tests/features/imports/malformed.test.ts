/*
 * Bad and awkward files through the whole pipeline (route handler -> storage -> import job):
 * each gives the expected report, and a refused file leaves half_hours and evenings untouched.
 * All data is SYNTHETIC (lib/synthetic) or hand-made.
 */
import { describe, expect, test } from "vitest";
import { analystWithSite, eveningCount, halfHourCount, importFile, syntheticCsv } from "@/tests/features/imports/helpers";
import type { ImportSettings } from "@/features/imports/schemas";

const BASE = syntheticCsv(3); // 144 half-hours, TIMESTAMP_START/END + 14 variables
const LINES = BASE.trimEnd().split("\n");
const HEADER = LINES[0] as string;
const DATA = LINES.slice(1);
const csv = (lines: string[], eol = "\n") => lines.join(eol) + eol;
const col = (name: string) => HEADER.split(",").indexOf(name);
/** Replaces field `name` of data line `i` (0-based among data lines). */
function setCell(lines: string[], i: number, name: string, value: string): string[] {
  const out = [...lines];
  const cells = (out[i] as string).split(",");
  cells[col(name)] = value;
  out[i] = cells.join(",");
  return out;
}

type Case = {
  name: string;
  content: string | Uint8Array;
  settings?: ImportSettings;
  expect: "landed" | "refused";
  check?: (r: { report: NonNullable<Awaited<ReturnType<typeof importFile>>["imp"]["report"]>; rows: number; message: string | null }) => void;
};

const cases: Case[] = [
  {
    name: "semicolon delimiter",
    content: csv([HEADER, ...DATA].map((l) => l.replace(/,/g, ";"))),
    expect: "landed",
    check: ({ report, rows }) => {
      expect(report.delimiter).toBe(";");
      expect(rows).toBe(144);
    },
  },
  {
    name: "tab delimiter",
    content: csv([HEADER, ...DATA].map((l) => l.replace(/,/g, "\t"))),
    expect: "landed",
    check: ({ report }) => expect(report.delimiter).toBe("\t"),
  },
  {
    name: "byte-order mark",
    content: `\uFEFF${BASE}`,
    expect: "landed",
    check: ({ report, rows }) => {
      expect(report.timestamp.columns).toEqual(["TIMESTAMP_START", "TIMESTAMP_END"]);
      expect(rows).toBe(144);
    },
  },
  {
    name: "CRLF line ends",
    content: csv([HEADER, ...DATA], "\r\n"),
    expect: "landed",
    check: ({ rows, report }) => {
      expect(rows).toBe(144);
      expect(report.rejectedTotal).toBe(0);
    },
  },
  {
    name: "units row under the header (pressure in hPa)",
    content: csv([
      HEADER,
      HEADER.split(",")
        .map((h) => ({ TIMESTAMP_START: "YYYYMMDDHHMM", TIMESTAMP_END: "YYYYMMDDHHMM", PA: "hPa", TA: "degC", WS: "m/s" })[h] ?? "")
        .join(","),
      ...DATA.map((l) => {
        const c = l.split(",");
        c[col("PA")] = String(Number(c[col("PA")]) * 10);
        return c.join(",");
      }),
    ]),
    expect: "landed",
    check: ({ report }) => {
      const pa = report.columns.find((c) => c.variable === "PA");
      expect(pa?.converted).toBe("hPa -> kPa");
      expect(pa?.outOfRange).toBe(0);
    },
  },
  {
    name: "no timestamp column",
    content: csv([HEADER.replace("TIMESTAMP_START,TIMESTAMP_END", "A,B"), ...DATA]),
    expect: "refused",
    check: ({ report }) => expect(report.refusal?.message).toMatch(/timestamp/i),
  },
  {
    name: "nothing recognised besides the timestamp",
    content: csv(["TIMESTAMP_START,TIMESTAMP_END,FOO,BAR", "202206010000,202206010030,1,2", "202206010030,202206010100,3,4"]),
    expect: "refused",
    check: ({ report }) => expect(report.refusal?.message).toMatch(/no column recognised/i),
  },
  {
    name: "non-numeric cells",
    content: csv([HEADER, ...setCell(setCell(DATA, 4, "WS", "calm"), 9, "TA", "12..5")]),
    expect: "landed",
    check: ({ report }) => {
      expect(report.columns.find((c) => c.variable === "WS")?.notNumeric).toBe(1);
      expect(report.columns.find((c) => c.variable === "TA")?.notNumeric).toBe(1);
      // Line numbers count the header as line 1.
      expect(report.rejectedSample.map((r) => [r.row, r.column])).toEqual(expect.arrayContaining([[6, "WS"], [11, "TA"]]));
    },
  },
  {
    name: "duplicate timestamps",
    content: csv([HEADER, ...DATA.slice(0, 10), DATA[9] as string, ...DATA.slice(10)]),
    expect: "landed",
    check: ({ report, rows }) => {
      expect(report.duplicates).toBe(1);
      expect(rows).toBe(144);
      expect(report.rejectedSample.some((r) => r.row === 12 && /duplicate/.test(r.reason))).toBe(true);
    },
  },
  {
    name: "rows out of time order",
    content: csv([HEADER, DATA[1] as string, DATA[0] as string, ...DATA.slice(2)]),
    expect: "landed",
    check: ({ report, rows }) => {
      expect(report.outOfOrder).toBeGreaterThan(0);
      expect(rows).toBe(144);
      expect(report.warnings.join(" ")).toMatch(/sorted/);
    },
  },
  {
    name: "mixed missing codes",
    content: csv([HEADER, ...setCell(setCell(setCell(setCell(DATA, 1, "H", "NA"), 2, "H", ""), 3, "H", "-9999.0"), 4, "H", "NaN")]),
    expect: "landed",
    check: ({ report }) => {
      const h = report.columns.find((c) => c.variable === "H");
      expect(h?.missing).toBeGreaterThanOrEqual(4);
      expect(h?.notNumeric).toBe(0);
    },
  },
  {
    name: "custom missing code from the mapping",
    content: csv([HEADER, ...setCell(DATA, 3, "LE", "-8888")]),
    settings: { missingCodes: ["-9999", "-8888", ""] },
    expect: "landed",
    check: ({ report }) => {
      const le = report.columns.find((c) => c.variable === "LE");
      expect(le?.outOfRange).toBe(0);
      expect(le?.missing).toBeGreaterThanOrEqual(1);
    },
  },
  {
    name: "empty file",
    content: "",
    expect: "refused",
    check: ({ report }) => expect(report.refusal?.message).toMatch(/empty/),
  },
  {
    name: "header only",
    content: `${HEADER}\n`,
    expect: "refused",
    check: ({ report }) => expect(report.refusal?.message).toMatch(/no data rows/),
  },
  {
    name: "binary file",
    content: Uint8Array.from({ length: 4096 }, (_, i) => (i * 7919 + 13) % 256),
    expect: "refused",
  },
  {
    name: "truncated last line",
    content: `${HEADER}\n${DATA.join("\n")}`.slice(0, -40),
    expect: "landed",
    check: ({ report, rows }) => {
      expect(rows).toBe(144);
      expect(report.warnings.join(" ")).toMatch(/different number of fields/);
    },
  },
  {
    name: "a 10,000-character cell",
    content: csv([HEADER, ...setCell(DATA, 7, "RH", "9".repeat(10_000))]),
    expect: "landed",
    check: ({ report }) => {
      const rh = report.rejectedSample.find((r) => r.column === "RH");
      expect(rh?.row).toBe(9);
      expect(report.columns.find((c) => c.variable === "RH")?.read).toBe(143);
    },
  },
  {
    name: "wrong unit for a variable",
    content: csv([HEADER.replace(",TA,", ",TA [m/s],"), ...DATA]),
    expect: "landed",
    check: ({ report }) => {
      expect(report.columns.some((c) => c.variable === "TA")).toBe(false);
      expect(report.warnings.join(" ")).toMatch(/not understood for TA/);
    },
  },
  {
    name: "values outside physical ranges",
    content: csv([HEADER, ...setCell(setCell(DATA, 2, "WD", "400"), 5, "WS", "-3")]),
    expect: "landed",
    check: ({ report }) => {
      expect(report.columns.find((c) => c.variable === "WD")?.outOfRange).toBe(1);
      expect(report.columns.find((c) => c.variable === "WS")?.outOfRange).toBe(1);
    },
  },
  {
    name: "timestamps off the half-hour",
    content: csv(["TIMESTAMP,WS,TA", "2022-06-01 00:30,1.0,10", "2022-06-01 01:00,1.1,10", "2022-06-01 01:17,1.2,10", "2022-06-01 01:30,1.3,10", "2022-06-01 02:00,1.4,10"]),
    expect: "landed",
    check: ({ report }) => {
      expect(report.irregularSteps).toBeGreaterThan(0);
      expect(report.warnings.join(" ")).toMatch(/not a multiple of 30 min/);
    },
  },
  {
    name: "an unreadable timestamp",
    content: csv([HEADER, ...DATA.slice(0, 5), (DATA[5] as string).replace(/^\d+/, "2022-13-45"), ...DATA.slice(6)]),
    expect: "refused",
    check: ({ report }) => {
      expect(report.refusal?.row).toBe(7);
      expect(report.refusal?.message).toMatch(/cannot read the timestamp/);
    },
  },
];

describe("malformed and awkward files", () => {
  test("there are at least 15 of them", () => {
    expect(cases.length).toBeGreaterThanOrEqual(15);
  });

  test.each(cases)("$name -> $expect", async (c) => {
    const { client, site } = await analystWithSite();
    const { job, imp } = await importFile(client, site.id, c.content, { name: `${c.name}.csv`, settings: c.settings });
    expect(imp.status).toBe(c.expect);
    const rows = await halfHourCount(site.id);
    if (c.expect === "refused") {
      expect(job.status).toBe("failed");
      expect(job.message).toMatch(/^Refused: .*Nothing was written\.$/);
      expect(rows).toBe(0);
      expect(await eveningCount(site.id)).toBe(0);
    } else {
      expect(job.status).toBe("done");
      expect(rows).toBe(imp.rowsWritten);
      expect(rows).toBeGreaterThan(0);
    }
    expect(imp.report).not.toBeNull();
    c.check?.({ report: imp.report!, rows, message: job.message });
  });
});
