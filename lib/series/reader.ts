/**
 * Streaming reader of half-hourly (fixed-interval) tower tables into a HalfHourTable.
 *
 * Text is parsed by papaparse in chunk mode (rows as arrays, no dynamic typing) and each cell
 * goes straight into a growing Float64Array per column, so neither the whole file as one string
 * nor an array of row objects is ever held.
 *
 * Documented behaviour:
 *  - Row numbers in the report and in TableError are 1-based line numbers of the file, header
 *    lines included (a quoted field with a line break inside would shift them; tower files have none).
 *  - The header is the first of the first ten lines that names a timestamp column (or a mapped
 *    column). Lines between it and the first data line are metadata: the first that looks like
 *    units is the units row, the others are skipped and reported.
 *  - Missing codes (default -9999, NA, NaN, N/A, #N/A, null and the empty cell) become NaN;
 *    a numeric code also matches its decimal spellings (-9999.0).
 *  - Cells that are not numbers, and values outside the physical range of their variable
 *    (after conversion to the canonical unit), become NaN and are listed as rejected.
 *  - Timestamps: a TIMESTAMP_START/END pair uses the start; END alone is shifted back by the
 *    period; a single timestamp column marks the period END unless timestampConvention says
 *    "start" (loggers stamp the end of the averaging period; common practice).
 *  - Rows out of time order are sorted into order and reported. Of rows with the same start,
 *    the first in the file is kept and the later ones are rejected with their line numbers.
 *    Steps that are not a multiple of the period are reported, rows kept.
 *  - A row whose timestamp cannot be read is fatal (TableError) unless badTimestamp is "skip".
 */
import { createReadStream, statSync } from "node:fs";
import Papa from "papaparse";
import {
  canonicalUnit,
  conversionFor,
  isKnownVariable,
  looksLikeUnitsRow,
  recognizeColumns,
  resolveColumns,
  type ColumnMapping,
  type ColumnPlan,
  type Conversion,
  type IgnoredColumn,
  type PlannedColumn,
} from "@/lib/series/recognize";
import { parseTimestamp } from "@/lib/series/timestamps";
import type { ColumnName, HalfHourTable, KnownVariable } from "@/lib/series/types";

/** A fatal problem with the input; `row` is the 1-based file line (null when not tied to one). */
export class TableError extends Error {
  readonly row: number | null;
  constructor(row: number | null, message: string) {
    super(message);
    this.name = "TableError";
    this.row = row;
  }
}

/**
 * Physical ranges in canonical units; values outside are rejected (common practice, chosen wide
 * so that only impossible values go: RH allows sensors' small overshoot above 100 %).
 */
export const DEFAULT_RANGES: Readonly<Record<KnownVariable, readonly [number, number] | null>> = {
  WS: [0, 75],
  WD: [0, 360],
  USTAR: [0, 10],
  W_SIGMA: [0, 10],
  H: [-500, 1500],
  LE: [-500, 1500],
  TA: [-80, 60],
  PA: [50, 110],
  RH: [0, 105],
  VPD: [-5, 150],
  ZL: [-1000, 1000],
  MO_LENGTH: null,
  FC: [-100, 100],
  CO2: [100, 2000],
  SW_IN: [-50, 1500],
};

export const DEFAULT_MISSING_CODES: readonly string[] = ["-9999", "NA", "NaN", "N/A", "#N/A", "null", ""];

export interface ReadOptions {
  /** UTC offset of the data clock, hours (standard time; e.g. -5, 5.5, +13). */
  utcOffsetHours: number;
  /** Explicit column mapping; overrides recognition. */
  mapping?: ColumnMapping;
  /** Cell texts meaning "missing"; replaces the default list. */
  missingCodes?: readonly string[];
  /** What a single timestamp column marks; default "end". */
  timestampConvention?: "start" | "end";
  /** Averaging period, minutes; inferred from the timestamps when absent. */
  periodMinutes?: number;
  /** Physical ranges by column, canonical units; null switches the check off for that column. */
  ranges?: Partial<Record<ColumnName, readonly [number, number] | null>>;
  /** A row whose timestamp cannot be read: "error" (default) throws, "skip" rejects the row. */
  badTimestamp?: "error" | "skip";
  /** Field delimiter; detected by papaparse when absent. */
  delimiter?: string;
  /** At most this many rejected cells are listed (counts stay exact); default 1000. */
  maxRejected?: number;
  /** Expected number of data rows, to size the arrays once. */
  expectedRows?: number;
  /**
   * Use the quote-free fast path for data lines (default true); false sends every line
   * through papaparse. Both give the same table and report.
   */
  fastPath?: boolean;
  /** Size of the input in bytes, when known, to size the arrays once. */
  sizeHintBytes?: number;
  /** Rows starting after this instant (UTC epoch ms) are rejected as in the future; default midnight UTC two days ahead. */
  notAfterMs?: number;
  /** Called after every parsed chunk. */
  onProgress?: (rowsRead: number, bytesRead: number) => void;
}

export interface RejectedCell {
  /** 1-based file line. */
  row: number;
  /** Header of the column ("" for the row as a whole). */
  column: string;
  /** Cell text (or value as in the file). */
  value: string;
  reason: string;
}

export interface RecognisedColumn extends PlannedColumn {
  /** Unit the values were read in (our key, e.g. "hPa"), null for tracers without a unit. */
  unitRead: string | null;
  unitInferred: boolean;
}

export interface ColumnStats {
  header: string;
  /** Cells with a usable value. */
  read: number;
  missing: number;
  notNumeric: number;
  outOfRange: number;
  /** "hPa -> kPa" when converted, else null. */
  converted: string | null;
}

export interface ReadReport {
  /** Data rows in the table. */
  rows: number;
  /** Lines seen in the file. */
  lines: number;
  headerLine: number;
  unitsLine: number | null;
  skippedLines: number[];
  delimiter: string;
  timestamp: {
    columns: string[];
    /** How the period start was found. */
    convention: "start-end pair" | "start" | "end" | "single, marks start" | "single, marks end";
    clockUtcOffsetHours: number;
  };
  periodMinutes: number;
  firstStartUtc: string | null;
  lastStartUtc: string | null;
  recognised: RecognisedColumn[];
  ignored: IgnoredColumn[];
  converted: { column: string; variable: ColumnName; from: string; to: string; inferred: boolean }[];
  rejected: RejectedCell[];
  /** Rejected cells not listed because of maxRejected. */
  rejectedNotListed: number;
  perColumn: Record<string, ColumnStats>;
  duplicates: number;
  outOfOrder: number;
  irregularSteps: number;
  gaps: { count: number; missingPeriods: number };
  warnings: string[];
}

export type TableInput = NodeJS.ReadableStream | AsyncIterable<Uint8Array | string> | string;

const HEADER_SEARCH_LINES = 10;
/** "12,5": a decimal comma, read as such only when the comma is not the field delimiter. */
const DECIMAL_COMMA = /^\s*[-+]?\d+,\d+\s*$/;
const POW10 = Array.from({ length: 23 }, (_, i) => 10 ** i);

/**
 * Index of the last `newline` with an even number of quote characters before it, or -1; one
 * pass over the text (a per-break recount made an unclosed quote quadratic in the file size).
 */
function lastBreakOutsideQuotes(text: string, newline: string): number {
  let best = -1;
  let quotes = 0;
  let q = text.indexOf('"');
  for (let nl = text.indexOf(newline); nl >= 0; nl = text.indexOf(newline, nl + newline.length)) {
    while (q >= 0 && q < nl) {
      quotes++;
      q = text.indexOf('"', q + 1);
    }
    if (quotes % 2 === 0) best = nl;
  }
  return best;
}

/**
 * Longest line the reader holds while waiting for its end, characters. Tower lines are well
 * under 10 kB; a line beyond this is an unclosed quote or not a table, and refusing it bounds
 * both memory and work per chunk.
 */
export const MAX_LINE_CHARS = 1_000_000;
const MAX_META_LINES = 5;

/** What decodeText found out about the bytes. */
interface DecodeState {
  bytes: number;
  /** Set when the text was not UTF-8 and was decoded otherwise. */
  encodingNote: string | null;
}

/**
 * The decoder for a stream starting with `head`: UTF-16 when it opens with a UTF-16 byte-order
 * mark (spreadsheet programs write "Unicode text" so), Windows-1252 (a superset of Latin-1) when
 * the first chunk is not valid UTF-8, else UTF-8. The default decoders drop the byte-order mark.
 */
function decoderFor(head: Uint8Array, state: DecodeState): TextDecoder {
  const kind = packedKind(head);
  if (kind) throw new TableError(1, `the file is ${kind}, not a table: unpack or export it as CSV text and upload that`);
  if (head[0] === 0xff && head[1] === 0xfe) return new TextDecoder("utf-16le");
  if (head[0] === 0xfe && head[1] === 0xff) return new TextDecoder("utf-16be");
  try {
    new TextDecoder("utf-8", { fatal: true }).decode(head, { stream: true });
    return new TextDecoder("utf-8");
  } catch {
    state.encodingNote = "the file is not UTF-8; it was read as Latin-1 (Windows-1252): check that names and units look right";
    return new TextDecoder("windows-1252");
  }
}

/** Archives and documents sent by mistake, named from their first bytes (never unpacked). */
function packedKind(head: Uint8Array): string | null {
  if (head[0] === 0x1f && head[1] === 0x8b) return "gzip-compressed";
  if (head[0] === 0x50 && head[1] === 0x4b && (head[2] === 0x03 || head[2] === 0x05) && (head[3] === 0x04 || head[3] === 0x06)) return "a zip archive (an .xlsx workbook is one)";
  if (head[0] === 0x42 && head[1] === 0x5a && head[2] === 0x68) return "bzip2-compressed";
  if (head[0] === 0x25 && head[1] === 0x50 && head[2] === 0x44 && head[3] === 0x46) return "a PDF document";
  if (head[0] === 0xd0 && head[1] === 0xcf && head[2] === 0x11 && head[3] === 0xe0) return "an old Office document (.xls)";
  return null;
}

async function* decodeText(input: TableInput, counter: DecodeState): AsyncGenerator<string> {
  const source: AsyncIterable<Uint8Array | string> =
    typeof input === "string" ? [input] as unknown as AsyncIterable<string> : (input as AsyncIterable<Uint8Array | string>);
  let decoder: TextDecoder | null = null;
  const early: Uint8Array[] = [];
  let earlyBytes = 0;
  let first = true;
  // Papaparse guesses the delimiter from its first chunk: give it enough lines.
  let head = "";
  for await (const chunk of source) {
    let text: string;
    if (typeof chunk === "string") {
      text = chunk;
      counter.bytes += chunk.length;
    } else {
      counter.bytes += chunk.byteLength;
      if (!decoder) {
        // The encoding is judged on the first few kB, however the stream is chunked.
        early.push(chunk);
        earlyBytes += chunk.byteLength;
        if (earlyBytes < 4096) continue;
        const joined = Buffer.concat(early);
        early.length = 0;
        decoder = decoderFor(joined, counter);
        text = decoder.decode(joined, { stream: true });
      } else text = decoder.decode(chunk, { stream: true });
    }
    if (first) {
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
      if (text.length === 0) continue;
      first = false;
    }
    if (head !== null && head.length + text.length < 16_384) {
      head += text;
      continue;
    }
    if (head) {
      text = head + text;
      head = "";
    }
    yield text;
  }
  let tail = "";
  if (!decoder && early.length > 0) {
    const joined = Buffer.concat(early);
    tail = decoderFor(joined, counter).decode(joined);
    if (first && tail.charCodeAt(0) === 0xfeff) tail = tail.slice(1);
  } else if (decoder) tail = decoder.decode();
  if (head || tail) yield head + tail;
}

/** Growing columnar store: one Float64Array per column, doubled when full. */
class Store {
  n = 0;
  cap: number;
  stampA: Float64Array;
  stampB: Float64Array;
  line: Float64Array;
  data: Float64Array[];
  constructor(columns: number, cap: number, withB: boolean) {
    this.cap = Math.max(16, cap);
    this.stampA = new Float64Array(this.cap);
    this.stampB = new Float64Array(withB ? this.cap : 0);
    this.line = new Float64Array(this.cap);
    this.data = Array.from({ length: columns }, () => new Float64Array(this.cap));
  }
  grow(): void {
    this.resize(Math.ceil(this.cap * 1.6));
  }
  resize(cap: number): void {
    const g = (a: Float64Array): Float64Array => {
      const b = new Float64Array(cap);
      b.set(a);
      return b;
    };
    this.stampA = g(this.stampA);
    if (this.stampB.length > 0) this.stampB = g(this.stampB);
    this.line = g(this.line);
    for (let k = 0; k < this.data.length; k++) this.data[k] = g(this.data[k] as Float64Array);
    this.cap = cap;
  }
}

function iso(ms: number): string {
  return new Date(ms).toISOString();
}

/** Most frequent positive difference, or NaN. */
function modeOfSteps(values: Float64Array, n: number, paired?: Float64Array): number {
  const counts = new Map<number, number>();
  const limit = Math.min(n, 50_000);
  for (let i = paired ? 0 : 1; i < limit; i++) {
    const d = paired ? (paired[i] as number) - (values[i] as number) : (values[i] as number) - (values[i - 1] as number);
    if (d > 0 && Number.isFinite(d)) counts.set(d, (counts.get(d) ?? 0) + 1);
  }
  let best = NaN;
  let bestCount = 0;
  for (const [d, c] of counts) {
    if (c > bestCount || (c === bestCount && d < best)) [best, bestCount] = [d, c];
  }
  return best;
}

function sampleMedian(a: Float64Array, n: number): number {
  const step = Math.max(1, Math.floor(n / 2000));
  const s: number[] = [];
  for (let i = 0; i < n; i += step) {
    const v = a[i] as number;
    if (Number.isFinite(v)) s.push(v);
  }
  if (s.length === 0) return NaN;
  s.sort((x, y) => x - y);
  return s[Math.floor(s.length / 2)] as number;
}

/**
 * A missing unit declaration for pressure or temperature is resolved from the magnitude of the
 * values (a pressure near 1000 is hPa, near 100000 Pa; a temperature near 290 is K), since
 * files often omit units and the ranges do not overlap.
 */
function inferUnit(variable: KnownVariable, median: number): string | null {
  if (!Number.isFinite(median)) return null;
  if (variable === "PA") {
    if (median > 20_000) return "Pa";
    if (median > 300) return "hPa";
  }
  if (variable === "TA" && median > 150) return "K";
  return null;
}

/**
 * Read a tower table from a stream (Node readable, any async iterable of bytes or text, or a
 * string) into typed arrays in canonical units, with a report of what was recognised, converted
 * and rejected. Throws TableError on fatal problems.
 */
export async function readTable(input: TableInput, options: ReadOptions): Promise<{ table: HalfHourTable; report: ReadReport }> {
  const clockOffsetMinutes = Math.round(options.utcOffsetHours * 60);
  if (!Number.isFinite(options.utcOffsetHours) || Math.abs(options.utcOffsetHours) > 14) {
    throw new TableError(null, `UTC offset ${options.utcOffsetHours} h is outside -14..+14`);
  }
  const missingCodes = options.missingCodes ?? DEFAULT_MISSING_CODES;
  const missingText = new Set(missingCodes.map((c) => c.trim().toLowerCase()));
  const missingNumbers = missingCodes.map((c) => (c.trim() === "" ? NaN : Number(c))).filter((v) => Number.isFinite(v));
  const emptyIsMissing = missingText.has("");
  const maxRejected = options.maxRejected ?? 1000;
  const badTimestamp = options.badTimestamp ?? "error";

  const warnings: string[] = [];
  const rejected: RejectedCell[] = [];
  let rejectedNotListed = 0;
  const reject = (row: number, column: string, value: string, reason: string): void => {
    if (rejected.length < maxRejected) rejected.push({ row, column, value, reason });
    else rejectedNotListed++;
  };

  let line = 0;
  let headerLine = 0;
  let unitsLine: number | null = null;
  const skippedLines: number[] = [];
  const pending: { line: number; cells: string[] }[] = [];
  let phase = "header" as "header" | "meta" | "data";
  let headers: string[] = [];
  let plan = null as ColumnPlan | null;
  let unitsRow: string[] | undefined;
  let store = null as Store | null;
  let colIndex: Int32Array = new Int32Array(0);
  let colHeaders: string[] = [];
  let fieldRole: Int32Array = new Int32Array(0);
  let missingCount: Int32Array = new Int32Array(0);
  let notNumericCount: Int32Array = new Int32Array(0);
  const fieldCountLines: number[] = [];
  let fieldCountProblems = 0;
  let skippedBadTimestamps = 0;
  let decimalCommas = 0;
  const bytes: DecodeState = { bytes: 0, encodingNote: null };

  let tsA = -1;
  let tsB = -1;
  let tsKind: NonNullable<ColumnPlan["timestamp"]>["kind"] = "single";

  const stampText = (cells: string[]): [string, string | null] => {
    if (tsKind === "dateTime") return [`${cells[tsA] ?? ""} ${(cells[tsB] ?? "").trim()}`.trim(), null];
    return [cells[tsA] ?? "", tsB >= 0 ? (cells[tsB] ?? "") : null];
  };

  const tryHeader = (cells: string[]): boolean => {
    const guesses = recognizeColumns(cells);
    const p = resolveColumns(guesses, options.mapping);
    const hasMapped = options.mapping !== undefined && p.unmatchedMappingKeys.length < Object.keys(options.mapping).length;
    return p.timestamp !== null || (hasMapped && p.columns.length > 0);
  };

  const startPlan = (cells: string[], at: number): void => {
    headers = cells.map((c) => c.trim());
    headerLine = at;
    plan = resolveColumns(recognizeColumns(headers), options.mapping);
    if (plan.conflicts.length > 0) throw new TableError(at, plan.conflicts.join("; "));
    if (!plan.timestamp) {
      throw new TableError(at, "no timestamp column: name one TIMESTAMP_START / TIMESTAMP_END / TIMESTAMP (or map it)");
    }
    if (plan.columns.length === 0) {
      throw new TableError(at, `no column recognised besides the timestamp (header: ${headers.slice(0, 12).join(", ")}${headers.length > 12 ? ", ..." : ""}); map the columns explicitly`);
    }
    for (const k of plan.unmatchedMappingKeys) warnings.push(`mapping names column "${k}", which is not in the header`);
    const ts = plan.timestamp;
    tsKind = ts.kind;
    if (ts.kind === "pair") [tsA, tsB] = [ts.start, ts.end];
    else if (ts.kind === "start") [tsA, tsB] = [ts.start, -1];
    else if (ts.kind === "end") [tsA, tsB] = [ts.end, -1];
    else if (ts.kind === "single") [tsA, tsB] = [ts.index, -1];
    else [tsA, tsB] = [ts.date, ts.time];
    colIndex = Int32Array.from(plan.columns.map((c) => c.index));
    colHeaders = plan.columns.map((c) => c.header);
    fieldRole = new Int32Array(headers.length).fill(-1);
    plan.columns.forEach((c, k) => {
      fieldRole[c.index] = k;
    });
    missingCount = new Int32Array(colIndex.length);
    notNumericCount = new Int32Array(colIndex.length);
    store = new Store(colIndex.length, options.expectedRows ?? 4096, ts.kind === "pair");
    phase = "meta";
  };

  const handleRows = (rows: string[][]): void => {
    let store_ = store;
    for (let r = 0; r < rows.length; r++) {
      const cells = rows[r] as string[];
      line++;
      if (cells.length === 1 && (cells[0] as string).trim() === "") continue;
      if (phase === "header") {
        if (tryHeader(cells)) {
          startPlan(cells, line);
          store_ = store;
          continue;
        }
        pending.push({ line, cells });
        if (pending.length >= HEADER_SEARCH_LINES) {
          throw new TableError(1, `no header with a timestamp column in lines 1-${line}; name one TIMESTAMP_START / TIMESTAMP_END / TIMESTAMP (or map it)`);
        }
        continue;
      }
      const cur = store_ as Store;
      const [aText, bText] = stampText(cells);
      const a = parseTimestamp(aText, clockOffsetMinutes);
      const b = bText === null ? 0 : parseTimestamp(bText, clockOffsetMinutes);
      if (phase === "meta") {
        if (a !== a || b !== b) {
          if (skippedLines.length + (unitsLine === null ? 0 : 1) < MAX_META_LINES) {
            if (unitsLine === null && looksLikeUnitsRow(cells)) {
              unitsLine = line;
              unitsRow = cells.map((c) => c.trim());
            } else skippedLines.push(line);
            continue;
          }
        }
        phase = "data";
      }
      if (a !== a || b !== b) {
        badStamp(a !== a ? aText : (bText ?? ""), a !== a);
        continue;
      }
      if (cells.length !== headers.length) {
        fieldCountProblems++;
        if (fieldCountLines.length < 10) fieldCountLines.push(line);
      }
      if (cur.n === cur.cap) cur.grow();
      const i = cur.n++;
      cur.stampA[i] = a;
      if (tsKind === "pair") cur.stampB[i] = b;
      cur.line[i] = line;
      const data = cur.data;
      for (let k = 0; k < colIndex.length; k++) {
        (data[k] as Float64Array)[i] = cellValue(cells[colIndex[k] as number], k, line);
      }
    }
  };

  /** Value of one cell, counting missing and rejected cells. Shared by both paths. */
  const cellValue = (cell: string | undefined, k: number, at: number): number => {
    if (cell === undefined || cell === "") {
      if (emptyIsMissing || cell === undefined) missingCount[k]!++;
      else {
        notNumericCount[k]!++;
        reject(at, colHeaders[k] as string, "", "empty cell is not a missing code here");
      }
      return NaN;
    }
    let v = Number(cell);
    if (v !== v && delimiter !== "," && DECIMAL_COMMA.test(cell)) {
      v = Number(cell.replace(",", "."));
      decimalCommas++;
    }
    if (v !== v) {
      if (missingText.has(cell.trim().toLowerCase())) missingCount[k]!++;
      else {
        notNumericCount[k]!++;
        reject(at, colHeaders[k] as string, cell, "not a number");
      }
      return NaN;
    }
    if (v === 0 && cell.trim() === "") {
      if (emptyIsMissing) missingCount[k]!++;
      else {
        notNumericCount[k]!++;
        reject(at, colHeaders[k] as string, cell, "blank cell is not a missing code here");
      }
      return NaN;
    }
    if (!Number.isFinite(v)) {
      notNumericCount[k]!++;
      reject(at, colHeaders[k] as string, cell, "not a finite number");
      return NaN;
    }
    return numericCheck(v, k);
  };

  const numericCheck = (v: number, k: number): number => {
    for (let m = 0; m < missingNumbers.length; m++) {
      if (v === missingNumbers[m]) {
        missingCount[k]!++;
        return NaN;
      }
    }
    return v;
  };

  /**
   * Fast path for the data lines of a portion without quote characters, the usual case for
   * tower files: fields are located with indexOf and plain decimals are converted from their
   * digits (an integer of at most 15 digits divided by an exact power of ten is the correctly
   * rounded value, so it equals Number(); Clinger 1990). Anything else (exponents, text,
   * whitespace, long mantissas) goes through Number() and the shared cell logic. Tests check
   * it against the papaparse path on generated files.
   */
  const scanFast = (text: string): void => {
    const cur = store as Store;
    const nFields = headers.length;
    const role = fieldRole;
    const delim = delimiter;
    const len = text.length;
    const lastTsField = Math.max(tsA, tsB);
    // Lines end where papaparse ends them: at the newline found in the first chunk ("\r" alone
    // in CR-only files). A CR before an LF is dropped only in LF files, where papaparse would
    // leave it in the last cell and Number() ignores it.
    const nl = newline === "\r" || newline === "\r\n" ? newline : "\n";
    const stripCr = nl === "\n";
    let pos = 0;
    while (pos <= len) {
      let eol = text.indexOf(nl, pos);
      if (eol < 0) eol = len;
      let lineEnd = eol;
      if (stripCr && lineEnd > pos && text.charCodeAt(lineEnd - 1) === 13) lineEnd--;
      line++;
      const lineStart = pos;
      pos = eol + nl.length;
      const firstDelim = text.indexOf(delim, lineStart);
      if ((firstDelim < 0 || firstDelim >= lineEnd) && text.slice(lineStart, lineEnd).trim() === "") continue;

      // Pass 1: the timestamp fields (usually the first ones).
      let aText: string | undefined;
      let bText: string | undefined;
      let field = 0;
      let fs = lineStart;
      while (fs <= lineEnd && field <= lastTsField) {
        let fe = text.indexOf(delim, fs);
        if (fe < 0 || fe > lineEnd) fe = lineEnd;
        if (field === tsA) aText = text.slice(fs, fe);
        else if (field === tsB) bText = text.slice(fs, fe);
        field++;
        fs = fe + 1;
      }
      const stamp = tsKind === "dateTime" ? `${aText ?? ""} ${(bText ?? "").trim()}`.trim() : (aText ?? "");
      const a = parseTimestamp(stamp, clockOffsetMinutes);
      const b = tsKind === "pair" ? parseTimestamp(bText ?? "", clockOffsetMinutes) : 0;
      if (a !== a || b !== b) {
        badStamp(a !== a ? stamp : (bText ?? ""), a !== a);
        continue;
      }

      // Pass 2: the value fields.
      if (cur.n === cur.cap) cur.grow();
      const i = cur.n++;
      cur.stampA[i] = a;
      if (tsKind === "pair") cur.stampB[i] = b;
      cur.line[i] = line;
      const data = cur.data;
      field = 0;
      fs = lineStart;
      let found = 0;
      while (fs <= lineEnd) {
        let fe = text.indexOf(delim, fs);
        if (fe < 0 || fe > lineEnd) fe = lineEnd;
        const r = field < nFields ? (role[field] as number) : -1;
        if (r >= 0) {
          found++;
          let p = fs;
          let neg = false;
          let c = p < fe ? text.charCodeAt(p) : -1;
          if (c === 45 || c === 43) {
            neg = c === 45;
            p++;
          }
          let mant = 0;
          let digits = 0;
          let frac = 0;
          let dot = false;
          let ok = p < fe;
          for (; p < fe; p++) {
            c = text.charCodeAt(p);
            if (c >= 48 && c <= 57) {
              mant = mant * 10 + (c - 48);
              digits++;
              if (dot) frac++;
            } else if (c === 46 && !dot) {
              dot = true;
            } else {
              ok = false;
              break;
            }
          }
          let v: number;
          if (ok && digits > 0 && digits <= 15) {
            v = mant / (POW10[frac] as number);
            v = numericCheck(neg ? -v : v, r);
          } else {
            v = cellValue(text.slice(fs, fe), r, line);
          }
          (data[r] as Float64Array)[i] = v;
        }
        field++;
        fs = fe + 1;
      }
      if (field !== nFields) {
        fieldCountProblems++;
        if (fieldCountLines.length < 10) fieldCountLines.push(line);
        if (found < colIndex.length) {
          for (let k = 0; k < colIndex.length; k++) {
            if ((colIndex[k] as number) >= field) {
              (data[k] as Float64Array)[i] = NaN;
              missingCount[k]!++;
            }
          }
        }
      }
    }
  };

  const badStamp = (bad: string, inA: boolean): void => {
    const col = inA ? (tsKind === "dateTime" ? `${headers[tsA]} + ${headers[tsB]}` : headers[tsA]) : headers[tsB];
    // A quote left open swallows the following lines into one cell: show its start only.
    const shown = bad.length > 60 ? `${bad.slice(0, 60).replace(/[\r\n]+/g, " ")}..." (${bad.length} characters${/[\r\n]/.test(bad) ? ", running over line breaks: is a quote left open?" : ""})` : `${bad}"`;
    const msg = `cannot read the timestamp "${shown} in column ${col} (expected YYYYMMDDHHMM, ISO 8601 or YYYY-MM-DD HH:MM)`;
    if (badTimestamp === "error") throw new TableError(line, msg);
    skippedBadTimestamps++;
    reject(line, col ?? "", bad, msg);
  };

  let delimiter = options.delimiter ?? "";
  let parseWarnings = 0;
  let resized = false;
  const firstParseErrors: string[] = [];

  const useFast = options.fastPath !== false;
  let newline = "";
  let carry = "";
  const feed = (portion: string): void => {
    if (portion.length === 0 && carry === "") return;
    if (phase === "data" && useFast && delimiter.length === 1 && portion.indexOf('"') < 0) {
      scanFast(portion);
    } else {
      const res = Papa.parse<string[]>(portion, {
        delimiter,
        newline: newline as "\n",
        header: false,
        dynamicTyping: false,
        skipEmptyLines: false,
      });
      if (!delimiter && res.meta.delimiter) delimiter = res.meta.delimiter;
      for (const e of res.errors) {
        parseWarnings++;
        if (firstParseErrors.length < 5) firstParseErrors.push(`${e.message} (line ${line + (e.row ?? 0) + 1})`);
      }
      handleRows(res.data);
    }
  };
  /** What is held back waiting for a line break stays below the limit: no runaway line. */
  const tooLong = (held: string): string => {
    if (held.length > MAX_LINE_CHARS) {
      // Held text with line breaks in it was not cut only because a quote is open.
      const quoted = newline !== "" && held.includes(newline);
      throw new TableError(
        line + 1,
        `line ${line + 1} is longer than ${MAX_LINE_CHARS.toLocaleString("en")} characters` +
          (quoted ? ': a quote (") opened on it is never closed' : ": is this a table with one record per line?"),
      );
    }
    return held;
  };
  for await (const chunk of decodeText(input, bytes)) {
    let text = carry + chunk;
    if (!newline) newline = text.includes("\r\n") ? "\r\n" : text.includes("\n") ? "\n" : text.includes("\r") ? "\r" : "";
    if (!newline) {
      carry = tooLong(text);
      continue;
    }
    // Cut after the last line break that is outside quotes (quotes pair up in CSV, so an odd
    // count before the cut means a quoted field continues into the next chunk).
    const cut = text.indexOf('"') >= 0 ? lastBreakOutsideQuotes(text, newline) : text.lastIndexOf(newline);
    if (cut < 0) {
      carry = tooLong(text);
      continue;
    }
    carry = text.slice(cut + newline.length);
    text = text.slice(0, cut);
    feed(text);
    if (!resized && store && options.sizeHintBytes && line > 0 && bytes.bytes > 0) {
      resized = true;
      // Size the arrays once from the file size and the bytes per line seen so far.
      const estimate = Math.ceil((options.sizeHintBytes / bytes.bytes) * line * 1.05) + 16;
      if (estimate > store.cap) store.resize(Math.min(estimate, 20_000_000));
    }
    options.onProgress?.(store?.n ?? 0, bytes.bytes);
  }
  if (carry !== "") {
    const last = newline && carry.endsWith(newline) ? carry.slice(0, -newline.length) : carry;
    carry = "";
    if (last !== "") feed(last);
  }
  options.onProgress?.(store?.n ?? 0, bytes.bytes);

  if (phase === "header") {
    if (line === 0) throw new TableError(1, "the file is empty");
    throw new TableError(1, `no header with a timestamp column in lines 1-${line}; name one TIMESTAMP_START / TIMESTAMP_END / TIMESTAMP (or map it)`);
  }
  const st = store as unknown as Store;
  const p = plan as unknown as ColumnPlan;
  const n = st.n;
  if (n === 0) throw new TableError(line, "no data rows after the header");

  if (bytes.encodingNote) warnings.push(bytes.encodingNote);
  if (decimalCommas > 0) warnings.push(`${decimalCommas} cells use a decimal comma (e.g. 12,5) and were read as decimals`);
  if (parseWarnings > 0) warnings.push(`${parseWarnings} CSV problems (e.g. ${firstParseErrors.join("; ")})`);
  if (fieldCountProblems > 0) {
    warnings.push(`${fieldCountProblems} rows have a different number of fields than the header (${headers.length}); missing fields read as missing (lines ${fieldCountLines.join(", ")}${fieldCountProblems > fieldCountLines.length ? ", ..." : ""})`);
  }
  if (skippedBadTimestamps > 0) warnings.push(`${skippedBadTimestamps} rows with an unreadable timestamp were skipped`);
  if (skippedLines.length > 0) warnings.push(`metadata lines ${skippedLines.join(", ")} under the header were skipped`);

  // ---- period and start of period
  const periodMsGiven = options.periodMinutes !== undefined ? options.periodMinutes * 60_000 : NaN;
  let periodMs: number;
  let convention: ReadReport["timestamp"]["convention"];
  const A = st.stampA;
  if (p.timestamp?.kind === "pair") {
    convention = "start-end pair";
    const fromPair = modeOfSteps(A, n, st.stampB);
    periodMs = Number.isFinite(periodMsGiven) ? periodMsGiven : fromPair;
    if (!Number.isFinite(periodMs)) throw new TableError(headerLine, "every TIMESTAMP_END is at or before its TIMESTAMP_START");
    let bad = 0;
    const badLines: number[] = [];
    for (let i = 0; i < n; i++) {
      if ((st.stampB[i] as number) - (A[i] as number) !== periodMs) {
        bad++;
        if (badLines.length < 10) badLines.push(st.line[i] as number);
      }
    }
    if (bad > 0) warnings.push(`${bad} rows have TIMESTAMP_END - TIMESTAMP_START different from the period of ${periodMs / 60_000} min (lines ${badLines.join(", ")}${bad > badLines.length ? ", ..." : ""}); the start is used`);
  } else {
    const inferred = modeOfSteps(A, n);
    if (Number.isFinite(periodMsGiven)) periodMs = periodMsGiven;
    else if (Number.isFinite(inferred)) periodMs = inferred;
    else {
      periodMs = 30 * 60_000;
      warnings.push("the period could not be inferred from a single row; 30 min assumed");
    }
    const marksEnd = p.timestamp?.kind === "end" || ((p.timestamp?.kind === "single" || p.timestamp?.kind === "dateTime") && (options.timestampConvention ?? "end") === "end");
    if (p.timestamp?.kind === "end") convention = "end";
    else if (p.timestamp?.kind === "start") convention = "start";
    else convention = marksEnd ? "single, marks end" : "single, marks start";
    if (convention === "single, marks end" && options.timestampConvention === undefined) {
      warnings.push("a single timestamp column is read as the END of each period (the usual logger convention); set the convention to \"start\" if it marks the start");
    }
    if (marksEnd) for (let i = 0; i < n; i++) A[i] = (A[i] as number) - periodMs;
  }
  const periodMinutes = periodMs / 60_000;

  // ---- units, conversion and ranges (on the raw arrays, file order)
  const recognised: RecognisedColumn[] = [];
  const converted: ReadReport["converted"] = [];
  const perColumn: Record<string, ColumnStats> = {};
  const units: HalfHourTable["units"] = {};
  const keep: boolean[] = [];
  const unitsGuess = unitsRow ? recognizeColumns(headers, unitsRow) : null;
  const ignored = [...p.ignored];
  for (let k = 0; k < p.columns.length; k++) {
    const c = p.columns[k] as PlannedColumn;
    const declared = c.source === "mapped" && c.unit !== null ? c.unit : (unitsGuess?.[c.index]?.unit ?? c.unit);
    const col = st.data[k] as Float64Array;
    const stats: ColumnStats = { header: c.header, read: 0, missing: missingCount[k] ?? 0, notNumeric: notNumericCount[k] ?? 0, outOfRange: 0, converted: null };
    let conv: Conversion | null = null;
    let inferred = false;
    if (isKnownVariable(c.name)) {
      let unitText = declared;
      if (unitText === null || unitText.trim() === "") {
        const u = inferUnit(c.name, sampleMedian(col, n));
        if (u) {
          unitText = u;
          inferred = true;
        }
      }
      conv = conversionFor(c.name, unitText);
      if (!conv) {
        warnings.push(`column "${c.header}": unit "${unitText}" is not understood for ${c.name} (canonical ${canonicalUnit(c.name)}); column left out`);
        ignored.push({ index: c.index, header: c.header, reason: `unit "${unitText}" not understood for ${c.name}` });
        keep.push(false);
        continue;
      }
      if (conv.from !== conv.to) {
        stats.converted = `${conv.from} -> ${conv.to}`;
        converted.push({ column: c.header, variable: c.name, from: conv.from, to: conv.to, inferred });
        if (inferred) warnings.push(`column "${c.header}" has no unit; read as ${conv.from} from the size of its values`);
      }
      units[c.name] = canonicalUnit(c.name);
    } else {
      units[c.name] = declared ?? "";
    }
    const range = options.ranges && c.name in options.ranges ? (options.ranges[c.name] ?? null) : isKnownVariable(c.name) ? DEFAULT_RANGES[c.name] : null;
    const scale = conv?.scale ?? 1;
    const offset = conv?.offset ?? 0;
    const lo = range ? range[0] : -Infinity;
    const hi = range ? range[1] : Infinity;
    const unitLabel = isKnownVariable(c.name) ? canonicalUnit(c.name) : (declared ?? "");
    let read = 0;
    let out = 0;
    for (let i = 0; i < n; i++) {
      const x = col[i] as number;
      if (x !== x) continue;
      const v = x * scale + offset;
      if (v < lo || v > hi) {
        col[i] = NaN;
        out++;
        reject(st.line[i] as number, c.header, String(x), `outside ${lo}..${hi} ${unitLabel}${scale !== 1 || offset !== 0 ? ` (is ${+v.toFixed(3)} after conversion)` : ""}`);
      } else {
        col[i] = v;
        read++;
      }
    }
    stats.read = read;
    stats.outOfRange = out;
    perColumn[c.name] = stats;
    keep.push(true);
    recognised.push({ ...c, unit: declared, unitRead: conv ? conv.from : declared, unitInferred: inferred });
  }
  ignored.sort((a, b) => a.index - b.index);

  // ---- order and duplicates
  let outOfOrder = 0;
  const outOfOrderLines: number[] = [];
  let strictlyIncreasing = true;
  for (let i = 1; i < n; i++) {
    const d = (A[i] as number) - (A[i - 1] as number);
    if (d <= 0) {
      strictlyIncreasing = false;
      if (d < 0) {
        outOfOrder++;
        if (outOfOrderLines.length < 10) outOfOrderLines.push(st.line[i] as number);
      }
    }
  }
  // Measurements cannot start after the reading; such rows are typos of the year or clock.
  // Whole UTC days, so that reading the same file twice gives the same report.
  const notAfter = options.notAfterMs ?? (Math.floor(Date.now() / 86_400_000) + 2) * 86_400_000;
  let future = 0;
  for (let i = 0; i < n; i++) if ((A[i] as number) > notAfter) future++;
  if (future === n) {
    throw new TableError(st.line[0] as number, `every row starts in the future (first ${iso(A[0] as number)}, after ${iso(notAfter)}): check the year and the UTC offset`);
  }
  let order: Uint32Array | null = null;
  let duplicates = 0;
  if (!strictlyIncreasing || future > 0) {
    const idx = new Uint32Array(n);
    for (let i = 0; i < n; i++) idx[i] = i;
    // The index tie-break keeps file order among equal stamps, so the first occurrence wins.
    idx.sort((x, y) => (A[x] as number) - (A[y] as number) || x - y);
    const kept = new Uint32Array(n);
    let m = 0;
    let lastKept = -1;
    for (let j = 0; j < n; j++) {
      const i = idx[j] as number;
      if ((A[i] as number) > notAfter) {
        reject(st.line[i] as number, p.timestampHeaders.join(" + "), iso(A[i] as number), "starts in the future");
        continue;
      }
      if (lastKept >= 0 && A[i] === A[lastKept]) {
        duplicates++;
        reject(st.line[i] as number, p.timestampHeaders.join(" + "), iso(A[i] as number), `duplicate period start (line ${st.line[lastKept]} kept)`);
        continue;
      }
      kept[m++] = i;
      lastKept = i;
    }
    order = kept.subarray(0, m);
    if (outOfOrder > 0) warnings.push(`${outOfOrder} rows were out of time order (lines ${outOfOrderLines.join(", ")}${outOfOrder > outOfOrderLines.length ? ", ..." : ""}); rows were sorted into time order`);
    if (duplicates > 0) warnings.push(`${duplicates} rows repeat an earlier period start; the first was kept, the repeats rejected`);
    if (future > 0) warnings.push(`${future} rows start in the future (after ${iso(notAfter)}) and were rejected`);
  }
  // Without reordering, a view avoids a transient second copy when the arrays were sized well.
  const tight = st.cap <= n * 1.1;
  const pick = (a: Float64Array): Float64Array => {
    if (!order) return tight ? a.subarray(0, n) : a.slice(0, n);
    const out = new Float64Array(order.length);
    for (let j = 0; j < order.length; j++) out[j] = a[order[j] as number] as number;
    return out;
  };
  const startMs = pick(A);
  const lines = order ? pick(st.line) : st.line;
  const columns: HalfHourTable["columns"] = {};
  for (let k = 0; k < p.columns.length; k++) {
    if (!keep[k]) continue;
    const c = p.columns[k] as PlannedColumn;
    columns[c.name] = pick(st.data[k] as Float64Array);
    st.data[k] = new Float64Array(0);
  }

  // ---- steps
  let irregularSteps = 0;
  const irregularLines: number[] = [];
  let gapCount = 0;
  let missingPeriods = 0;
  for (let i = 1; i < startMs.length; i++) {
    const d = (startMs[i] as number) - (startMs[i - 1] as number);
    if (d === periodMs) continue;
    if (d % periodMs !== 0) {
      irregularSteps++;
      if (irregularLines.length < 10) irregularLines.push(lines[i] as number);
    } else {
      gapCount++;
      missingPeriods += d / periodMs - 1;
    }
  }
  if (irregularSteps > 0) {
    warnings.push(`${irregularSteps} steps between rows are not a multiple of ${periodMinutes} min (lines ${irregularLines.join(", ")}${irregularSteps > irregularLines.length ? ", ..." : ""}); rows kept`);
  }

  const table: HalfHourTable = { startMs, periodMinutes, columns, units };
  const report: ReadReport = {
    rows: startMs.length,
    lines: line,
    headerLine,
    unitsLine,
    skippedLines,
    delimiter,
    timestamp: { columns: p.timestampHeaders, convention, clockUtcOffsetHours: options.utcOffsetHours },
    periodMinutes,
    firstStartUtc: startMs.length > 0 ? iso(startMs[0] as number) : null,
    lastStartUtc: startMs.length > 0 ? iso(startMs[startMs.length - 1] as number) : null,
    recognised,
    ignored,
    converted,
    rejected: rejected.sort((x, y) => x.row - y.row),
    rejectedNotListed,
    perColumn,
    duplicates,
    outOfOrder,
    irregularSteps,
    gaps: { count: gapCount, missingPeriods },
    warnings,
  };
  return { table, report };
}

/**
 * Read a table from a file path, streaming; sizes the arrays from the file size.
 */
export async function readTableFile(path: string, options: ReadOptions): Promise<{ table: HalfHourTable; report: ReadReport }> {
  let size = 0;
  try {
    size = statSync(path).size;
  } catch (e) {
    throw new TableError(null, `cannot open: ${(e as Error).message}`);
  }
  const stream = createReadStream(path, { highWaterMark: 1 << 18 });
  return readTable(stream, { sizeHintBytes: size, ...options });
}
