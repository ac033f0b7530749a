import "server-only";
import { Readable } from "node:stream";
import type { Knex } from "knex";
import { isKnownVariable } from "@/lib/series/recognize";
import type { HalfHourTable } from "@/lib/series/types";
import type { OverlapChoice } from "@/features/imports/schemas";

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

/** Rows per chunk of the stream sent to the server: big enough to keep the socket busy, small in memory. */
export const ROWS_PER_CHUNK = 2000;

/** Progress is reported about this often (rows). */
const PROGRESS_EVERY = 20_000;

/**
 * The table as LOAD DATA text, chunk by chunk: `start<TAB>v1<TAB>...\n`, `\N` for missing. Numbers
 * are written in JavaScript's shortest round-trip form, which MariaDB reads back to the same double.
 */
async function* tsvChunks(
  table: HalfHourTable,
  plan: WritePlan,
  onRows: (rowsSent: number) => void | Promise<void>,
): AsyncGenerator<Buffer> {
  const n = table.startMs.length;
  const arrays = plan.arrays;
  const k = arrays.length;
  let lastReported = 0;
  for (let from = 0; from < n; from += ROWS_PER_CHUNK) {
    const to = Math.min(n, from + ROWS_PER_CHUNK);
    let text = "";
    for (let i = from; i < to; i++) {
      let row = sqlDatetime(table.startMs[i] as number);
      for (let c = 0; c < k; c++) {
        const v = (arrays[c] as Float64Array)[i] as number;
        // NaN (missing) and the infinities become NULL; the reader never yields invented values.
        row += Number.isFinite(v) ? `\t${v}` : "\t\\N";
      }
      text += `${row}\n`;
    }
    yield Buffer.from(text, "latin1");
    if (to - lastReported >= PROGRESS_EVERY) {
      lastReported = to;
      await onRows(to);
    }
  }
}

type LoadResult = { affectedRows?: number; warningStatus?: number };

function resultHeader(r: unknown): LoadResult {
  return (Array.isArray(r) ? r[0] : r) as LoadResult;
}

/**
 * Writes the table into half_hours on `trx` with one LOAD DATA LOCAL INFILE whose "file" is a
 * stream generated from the table (never a file on disk, never the whole text in memory). The
 * caller owns the transaction, so the import lands whole or not at all. `choice` decides rows
 * whose (site, start) already exists: "replace" puts the file's row in place of the stored one
 * (REPLACE: the period then belongs wholly to this import), "keep" leaves the stored row (IGNORE);
 * null means the caller found no overlap under its lock, so any row the server skips or bends is
 * an error that rolls everything back. Returns the number of rows inserted or replaced.
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
  if (n === 0) return 0;
  if (!Number.isSafeInteger(siteId) || !Number.isSafeInteger(importId))
    throw new Error("writeHalfHours: ids must be integers");
  for (const c of plan.columns)
    if (!/^[a-z0-9_]+$/.test(c)) throw new Error(`writeHalfHours: bad column name ${c}`);
  const mode = choice === "keep" ? "IGNORE " : choice === "replace" ? "REPLACE " : "";
  // site_id and import_id are constants of the statement (SET), so each line carries only the data.
  const sql =
    `LOAD DATA LOCAL INFILE 'import-${importId}.tsv' ${mode}INTO TABLE half_hours CHARACTER SET ascii ` +
    "FIELDS TERMINATED BY '\\t' ESCAPED BY '\\\\' LINES TERMINATED BY '\\n' " +
    `(start_utc${plan.columns.map((c) => `, ${c}`).join("")}) SET site_id = ${siteId}, import_id = ${importId}`;
  const body = Readable.from(tsvChunks(table, plan, (rows) => onProgress?.(rows)));
  let res: LoadResult;
  try {
    res = resultHeader(await trx.raw(sql).options({ infileStreamFactory: () => body }));
  } finally {
    // A statement that failed (connection cut, server error) must not keep feeding its socket:
    // the pool may already have dropped the connection and its error listeners.
    body.destroy();
  }
  if (choice !== "keep" && (res.warningStatus ?? 0) > 0) {
    // The server bends or skips bad lines of a LOCAL load into warnings instead of failing it.
    const [warnings] = (await trx.raw("SHOW WARNINGS LIMIT 3")) as [Array<{ Message: string }>];
    throw new Error(
      `the database did not take every row as written: ${warnings.map((w) => w.Message).join("; ")}`,
    );
  }
  await onProgress?.(n);
  // REPLACE counts a replaced row twice (delete + insert); every line of the file is in the table then.
  return choice === "keep" ? (res.affectedRows ?? 0) : n;
}
