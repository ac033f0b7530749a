import "server-only";
import type { ReadReport, RejectedCell } from "@/lib/series/reader";
import type { ImportReport } from "@/features/imports/schemas";

/** Rejected cells kept in the stored report; the full list goes to the CSV. */
export const REJECTED_SAMPLE = 50;

/** The stored validation report of a file the reader accepted. */
export function reportFromRead(read: ReadReport, rejectedKey: string | null): ImportReport {
  const columns = read.recognised.map((c) => {
    const s = read.perColumn[c.name];
    return {
      header: c.header,
      variable: c.name,
      unit: c.unitRead,
      read: s?.read ?? 0,
      missing: s?.missing ?? 0,
      notNumeric: s?.notNumeric ?? 0,
      outOfRange: s?.outOfRange ?? 0,
      converted: s?.converted ?? null,
    };
  });
  return {
    rows: read.rows,
    lines: read.lines,
    periodMinutes: read.periodMinutes,
    firstStartUtc: read.firstStartUtc,
    lastStartUtc: read.lastStartUtc,
    delimiter: read.delimiter,
    timestamp: read.timestamp,
    columns,
    ignored: read.ignored.map((i) => ({ header: i.header, reason: i.reason })),
    duplicates: read.duplicates,
    outOfOrder: read.outOfOrder,
    irregularSteps: read.irregularSteps,
    gaps: read.gaps,
    warnings: read.warnings,
    rejectedSample: read.rejected.slice(0, REJECTED_SAMPLE),
    rejectedTotal: read.rejected.length + read.rejectedNotListed,
    rejectedKey,
    refusal: null,
    overlap: null,
    written: null,
    evenings: null,
  };
}

/** The stored report of a file refused before any write. */
export function refusalReport(row: number | null, message: string): ImportReport {
  return {
    rows: 0,
    lines: 0,
    periodMinutes: 0,
    firstStartUtc: null,
    lastStartUtc: null,
    delimiter: "",
    timestamp: { columns: [], convention: "", clockUtcOffsetHours: 0 },
    columns: [],
    ignored: [],
    duplicates: 0,
    outOfOrder: 0,
    irregularSteps: 0,
    gaps: { count: 0, missingPeriods: 0 },
    warnings: [],
    rejectedSample: [],
    rejectedTotal: 0,
    rejectedKey: null,
    refusal: { row, message },
    overlap: null,
    written: null,
    evenings: null,
  };
}

function csvCell(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** The full rejected list as CSV text chunks (line, column, value, reason). */
export function* rejectedCsv(rejected: readonly RejectedCell[], notListed: number): Generator<string> {
  yield "line,column,value,reason\n";
  let buf = "";
  for (const r of rejected) {
    buf += `${r.row},${csvCell(r.column)},${csvCell(r.value)},${csvCell(r.reason)}\n`;
    if (buf.length > 65_536) {
      yield buf;
      buf = "";
    }
  }
  if (notListed > 0) buf += `,,,"${notListed} more rejected cells not listed"\n`;
  if (buf) yield buf;
}
