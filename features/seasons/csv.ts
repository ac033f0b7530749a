import Papa from "papaparse";

// OWASP "CSV Injection": text cells starting with = + - @, tab or CR get a leading quote; numbers stay numbers.
const FORMULA_START = /^[=+\-@\t\r]/;

/** CSV text (CRLF line ends) of rows whose first row is the header. */
export function toCsv(rows: ReadonlyArray<ReadonlyArray<string | number | null>>): string {
  return `${Papa.unparse(rows as unknown[][], { escapeFormulae: FORMULA_START, newline: "\r\n" })}\r\n`;
}
