import "server-only";
import type { Knex } from "knex";
import { isKnownVariable } from "@/lib/series/recognize";
import type { HalfHourTable } from "@/lib/series/types";
import type { OverlapChoice } from "@/features/imports/schemas";

/** Rows per INSERT statement: large enough to amortise the round trip, small enough for any packet limit. */
export const ROWS_PER_STATEMENT = 1000;

/** half_hours column of each canonical variable (snake_case of the name). */
export function measureColumn(variable: string): string {
  return variable.toLowerCase();
}

/** "YYYY-MM-DD HH:MM:SS" (UTC) of an epoch-ms value, as MariaDB DATETIME text. */
export function sqlDatetime(ms: number): string {
  const s = new Date(ms).toISOString();
  return `${s.slice(0, 10)} ${s.slice(11, 19)}`;
}

export interface WritePlan {
  /** half_hours columns in the order of `arrays`. */
  columns: string[];
  arrays: Float64Array[];
}

/**
 * Which half_hours column receives each table column: known variables by name, tracers by the
 * slot the site gave them (tracerSlots: name -> 1..8).
 */
export function planColumns(table: HalfHourTable, tracerSlots: ReadonlyMap<string, number>): WritePlan {
  const columns: string[] = [];
  const arrays: Float64Array[] = [];
  for (const [name, values] of Object.entries(table.columns)) {
    if (!values) continue;
    if (isKnownVariable(name)) columns.push(measureColumn(name));
    else {
      const slot = tracerSlots.get(name);
      if (slot === undefined) throw new Error(`no series slot for tracer ${name}`);
      columns.push(`tracer_${slot}`);
    }
    arrays.push(values);
  }
  return { columns, arrays };
}

/**
 * Writes the table into half_hours in multi-row INSERT statements on `trx` (the caller owns the
 * transaction, so the import lands whole or not at all). The next statement is built while the
 * previous one runs. `choice` decides rows whose (site, start) already exists: "replace"
 * overwrites them, "keep" leaves them; null means the caller found no overlap.
 * Returns the number of rows inserted or replaced.
 */
export async function writeHalfHours(
  trx: Knex.Transaction,
  siteId: number,
  importId: number,
  table: HalfHourTable,
  plan: WritePlan,
  choice: OverlapChoice | null,
  onProgress?: (rowsDone: number) => void | Promise<void>,
): Promise<number> {
  const n = table.startMs.length;
  const head =
    `${choice === "keep" ? "INSERT IGNORE" : "INSERT"} INTO half_hours (site_id, start_utc, import_id` +
    plan.columns.map((c) => `, ${c}`).join("") +
    ") VALUES ";
  const tail =
    choice === "replace"
      ? ` ON DUPLICATE KEY UPDATE import_id = VALUES(import_id)${plan.columns.map((c) => `, ${c} = VALUES(${c})`).join("")}`
      : "";
  const prefix = `(${siteId},'`;
  const mid = `',${importId}`;
  const arrays = plan.arrays;
  const k = arrays.length;

  const build = (from: number, to: number): string => {
    const parts: string[] = new Array<string>(to - from);
    for (let i = from; i < to; i++) {
      let row = prefix + sqlDatetime(table.startMs[i] as number) + mid;
      for (let c = 0; c < k; c++) {
        const v = (arrays[c] as Float64Array)[i] as number;
        // NaN (missing) and the infinities become NULL; the reader never yields invented values.
        row += Number.isFinite(v) ? `,${v}` : ",NULL";
      }
      parts[i - from] = `${row})`;
    }
    return head + parts.join(",") + tail;
  };

  let written = 0;
  let inFlight: Promise<number> | null = null;
  let lastReported = 0;
  const affected = (r: unknown): number => {
    const header = Array.isArray(r) ? (r[0] as { affectedRows?: number }) : (r as { affectedRows?: number });
    return header?.affectedRows ?? 0;
  };
  for (let from = 0; from < n; from += ROWS_PER_STATEMENT) {
    const to = Math.min(n, from + ROWS_PER_STATEMENT);
    const sql = build(from, to);
    if (inFlight) written += await inFlight;
    // Under ON DUPLICATE KEY UPDATE a replaced row counts 2 in affectedRows; count statement rows instead.
    const rows = to - from;
    inFlight = trx.raw(sql).then((r: unknown) => (choice === "keep" ? affected(r) : rows));
    // Marks a failure as handled while progress is written; the await above rethrows it.
    inFlight.catch(() => undefined);
    if (onProgress && to - lastReported >= 20_000) {
      lastReported = to;
      await onProgress(from);
    }
  }
  if (inFlight) written += await inFlight;
  await onProgress?.(n);
  return written;
}
