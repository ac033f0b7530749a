import "server-only";
import { Readable } from "node:stream";
import type { Knex } from "knex";
import { MEASURE_COLUMNS, TRACER_SLOTS } from "@/lib/evenings/load";
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

/** Value columns of half_hours: a period counts as present when one of them holds a value. */
const VALUE_COLUMNS = [
  ...Object.values(MEASURE_COLUMNS),
  ...Array.from({ length: TRACER_SLOTS }, (_, i) => `tracer_${i + 1}`),
];

type Tally = { stored: number; present: number };

/*
 * site_coverage (the site list's summary) is kept here, beside the only statements that write or
 * delete half_hours, in their transaction, as deltas of what the statement changed. The counts are
 * locking reads of the rows the statement touches (so they see the newest committed rows, not the
 * transaction's snapshot, and nobody changes those rows until commit), and the summary row is
 * changed by one atomic statement at the end, so writes of one site in parallel add up. The cost
 * follows the rows written, not the site's span.
 */
async function tally(
  trx: Knex.Transaction,
  siteId: number,
  where: string,
  bindings: readonly (string | number)[],
  lock: "FOR UPDATE" | "LOCK IN SHARE MODE",
): Promise<Tally> {
  const [rows] = (await trx.raw(
    `SELECT COUNT(*) AS stored, COUNT(COALESCE(${VALUE_COLUMNS.join(", ")})) AS present
       FROM half_hours WHERE site_id = ? AND ${where} ${lock}`,
    [siteId, ...bindings],
  )) as [Array<{ stored: number | string; present: number | string }>];
  return { stored: Number(rows[0]?.stored ?? 0), present: Number(rows[0]?.present ?? 0) };
}

/** Rows of the table with a value in at least one written column. */
function presentRows(n: number, plan: WritePlan): number {
  let present = 0;
  for (let i = 0; i < n; i++) if (plan.arrays.some((a) => Number.isFinite(a[i]))) present++;
  return present;
}

/**
 * Writes the table into half_hours on `trx` with one LOAD DATA LOCAL INFILE whose "file" is a
 * stream generated from the table (never a file on disk, never the whole text in memory). The
 * caller owns the transaction, so the import lands whole or not at all. `choice` decides rows
 * whose (site, start) already exists: "replace" puts the file's row in place of the stored one
 * (REPLACE: the period then belongs wholly to this import), "keep" leaves the stored row (IGNORE);
 * null means the caller found no overlap under its lock, so any row the server skips or bends is
 * an error that rolls everything back. The site's site_coverage row follows in the same
 * transaction. Returns the number of rows inserted or replaced.
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
  let firstMs = Infinity;
  let lastMs = -Infinity;
  for (const t of table.startMs) {
    if (t < firstMs) firstMs = t;
    if (t > lastMs) lastMs = t;
  }
  const period: [string, string] = [sqlDatetime(firstMs), sqlDatetime(lastMs)];
  // Stored rows change only inside the file's period: counted there before and after the load.
  const overlapping = choice === "keep" || choice === "replace";
  const before = overlapping
    ? await tally(trx, siteId, "start_utc BETWEEN ? AND ?", period, "LOCK IN SHARE MODE")
    : { stored: 0, present: 0 };
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
  // Without an overlap choice every line is a new row (anything else failed above).
  const after = overlapping
    ? await tally(trx, siteId, "start_utc BETWEEN ? AND ?", period, "LOCK IN SHARE MODE")
    : { stored: n, present: presentRows(n, plan) };
  await trx.raw(
    `INSERT INTO site_coverage (site_id, stored_half_hours, present_half_hours, first_start_utc, last_start_utc)
     VALUES (?, ?, ?, ?, ?)
     ON DUPLICATE KEY UPDATE
       stored_half_hours = stored_half_hours + VALUES(stored_half_hours),
       present_half_hours = present_half_hours + VALUES(present_half_hours),
       first_start_utc = LEAST(COALESCE(first_start_utc, VALUES(first_start_utc)), VALUES(first_start_utc)),
       last_start_utc = GREATEST(COALESCE(last_start_utc, VALUES(last_start_utc)), VALUES(last_start_utc))`,
    [siteId, after.stored - before.stored, after.present - before.present, period[0], period[1]],
  );
  await onProgress?.(n);
  // REPLACE counts a replaced row twice (delete + insert); every line of the file is in the table then.
  return choice === "keep" ? (res.affectedRows ?? 0) : n;
}

/**
 * Deletes the half_hours rows of one import of a site on `trx` and keeps the site's coverage
 * summary true in the same transaction. Returns the number of rows deleted.
 */
export async function deleteImportHalfHours(
  trx: Knex.Transaction,
  siteId: number,
  importId: number,
): Promise<number> {
  const gone = await tally(trx, siteId, "import_id = ?", [importId], "FOR UPDATE");
  if (gone.stored === 0) return 0;
  await trx("half_hours").where({ site_id: siteId, import_id: importId }).delete();
  // The deleted rows may have held either end; the primary key finds the new ones directly (locking
  // reads: a parallel write cannot slip a row past them before commit).
  const end = async (order: "ASC" | "DESC") => {
    const [rows] = (await trx.raw(
      `SELECT start_utc FROM half_hours WHERE site_id = ? ORDER BY start_utc ${order} LIMIT 1 LOCK IN SHARE MODE`,
      [siteId],
    )) as [Array<{ start_utc: Date }>];
    return rows[0]?.start_utc ?? null;
  };
  await trx("site_coverage")
    .where({ site_id: siteId })
    .update({
      stored_half_hours: trx.raw("stored_half_hours - ?", [gone.stored]),
      present_half_hours: trx.raw("present_half_hours - ?", [gone.present]),
      first_start_utc: await end("ASC"),
      last_start_utc: await end("DESC"),
    });
  return gone.stored;
}
