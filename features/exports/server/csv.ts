import "server-only";
import Papa from "papaparse";

// OWASP "CSV Injection": a text cell that begins with = + - @, tab or carriage return is
// prefixed with a single quote so spreadsheets show it as text. Numbers are written as
// numbers (papaparse only escapes strings), so negative values stay numeric.
const FORMULA_START = /^[=+\-@\t\r]/;

/** CSV text of rows (no header unless given as the first row), CRLF line ends as RFC 4180. */
export function csvLines(rows: ReadonlyArray<ReadonlyArray<string | number | boolean | null>>): string {
  if (rows.length === 0) return "";
  return `${Papa.unparse(rows as unknown[][], { escapeFormulae: FORMULA_START, newline: "\r\n", header: false })}\r\n`;
}

/** An hours offset as ±HH:MM. */
export function offsetText(hours: number): string {
  const sign = hours < 0 ? "-" : "+";
  const minutes = Math.round(Math.abs(hours) * 60);
  return `${sign}${String(Math.floor(minutes / 60)).padStart(2, "0")}:${String(minutes % 60).padStart(2, "0")}`;
}

/** An instant as ISO 8601 local time of the data clock with its offset, e.g. 2021-06-01T20:12:00+01:00. */
export function isoWithOffset(utc: Date, offsetHours: number): string {
  const local = new Date(utc.getTime() + offsetHours * 3_600_000);
  return `${local.toISOString().slice(0, 19)}${offsetText(offsetHours)}`;
}
