import type { HalfHourTable } from "@/lib/series/types";
import { generateSyntheticBlocks, type SyntheticOptions } from "./generator";

/**
 * CSV in the trade's usual layout: TIMESTAMP_START and TIMESTAMP_END as YYYYMMDDHHMM in local
 * standard time, one column per variable, -9999 for missing (common practice).
 */

export const MISSING = -9999;

const DECIMALS: Record<string, number> = {
  WS: 3,
  WD: 1,
  USTAR: 4,
  W_SIGMA: 4,
  H: 2,
  LE: 2,
  TA: 3,
  PA: 3,
  RH: 2,
  VPD: 3,
  ZL: 4,
  FC: 3,
  CO2: 2,
  SW_IN: 1,
};

export interface CsvOptions {
  /** UTC offset of the local standard time written in the timestamps, hours */
  utcOffsetHours: number;
  /** columns in order (default: every column of the table) */
  columns?: string[];
  /** rows per yielded chunk (default 2000) */
  rowsPerChunk?: number;
  /** write the header line (default true) */
  header?: boolean;
}

function pad2(n: number): string {
  return n < 10 ? `0${n}` : String(n);
}

/** YYYYMMDDHHMM of a UTC epoch ms on a clock with the given offset. */
export function formatStamp(utcMs: number, utcOffsetHours: number): string {
  const d = new Date(utcMs + utcOffsetHours * 3_600_000);
  return `${d.getUTCFullYear()}${pad2(d.getUTCMonth() + 1)}${pad2(d.getUTCDate())}${pad2(d.getUTCHours())}${pad2(d.getUTCMinutes())}`;
}

/** Streams a table as CSV text chunks (header first); never builds the whole file as one string. */
export function* tableCsvChunks(table: HalfHourTable, options: CsvOptions): Generator<string> {
  const names = options.columns ?? Object.keys(table.columns);
  const arrays = names.map((n) => table.columns[n] ?? null);
  const decimals = names.map((n) => DECIMALS[n] ?? 3);
  const per = options.rowsPerChunk ?? 2000;
  const periodMs = table.periodMinutes * 60_000;
  if (options.header ?? true) yield `TIMESTAMP_START,TIMESTAMP_END${names.map((n) => `,${n}`).join("")}\n`;
  const n = table.startMs.length;
  for (let from = 0; from < n; from += per) {
    const to = Math.min(n, from + per);
    const lines: string[] = [];
    for (let i = from; i < to; i++) {
      const t = table.startMs[i] as number;
      let line = `${formatStamp(t, options.utcOffsetHours)},${formatStamp(t + periodMs, options.utcOffsetHours)}`;
      for (let c = 0; c < arrays.length; c++) {
        const a = arrays[c];
        const v = a ? (a[i] as number) : Number.NaN;
        line += Number.isFinite(v) ? `,${v.toFixed(decimals[c])}` : `,${MISSING}`;
      }
      lines.push(line);
    }
    yield `${lines.join("\n")}\n`;
  }
}

/** The whole table as one CSV string (small tables only; use tableCsvChunks for long ones). */
export function tableToCsv(table: HalfHourTable, options: CsvOptions): string {
  let out = "";
  for (const chunk of tableCsvChunks(table, options)) out += chunk;
  return out;
}

/**
 * Streams a SYNTHETIC data set as CSV, generated block by block (30 days at a time), so twenty
 * years can be written with memory bounded by one block.
 */
export function* syntheticCsvChunks(opts: SyntheticOptions, csv?: Omit<CsvOptions, "utcOffsetHours" | "header">): Generator<string> {
  let first = true;
  let columns = csv?.columns;
  for (const block of generateSyntheticBlocks(opts)) {
    columns ??= Object.keys(block.table.columns);
    yield* tableCsvChunks(block.table, { ...csv, columns, utcOffsetHours: opts.site.utcOffsetHours, header: first });
    first = false;
  }
}
