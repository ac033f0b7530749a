import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";
import { VARIABLES, type HalfHourTable, type KnownVariable } from "@/lib/series/types";

/** half_hours column of each canonical variable. */
export const MEASURE_COLUMNS: Readonly<Record<KnownVariable, string>> = {
  WS: "ws",
  WD: "wd",
  USTAR: "ustar",
  W_SIGMA: "w_sigma",
  H: "h",
  LE: "le",
  TA: "ta",
  PA: "pa",
  RH: "rh",
  VPD: "vpd",
  ZL: "zl",
  MO_LENGTH: "mo_length",
  FC: "fc",
  CO2: "co2",
  SW_IN: "sw_in",
};

/** Number of tracer slots in half_hours (tracer_1..tracer_8). */
export const TRACER_SLOTS = 8;

export interface SiteSeries {
  slot: number;
  name: string;
  unit: string;
  kind: "concentration" | "flux";
}

type Db = Knex | Knex.Transaction;

/** The named tracer series of a site, by slot. */
export async function listSiteSeries(siteId: number, conn: Db = db): Promise<SiteSeries[]> {
  const [rows] = (await conn.raw("SELECT slot, name, unit, kind FROM site_series WHERE site_id = ? ORDER BY slot", [
    siteId,
  ])) as [SiteSeries[]];
  return rows;
}

/** The mysql2 (callback API) connection knex holds; only what the streamed read uses. */
interface RawConnection {
  query(options: { sql: string; rowsAsArray: boolean }, values: unknown[]): RowEmitter;
  execute(options: { sql: string; rowsAsArray: boolean }, values: unknown[]): RowEmitter;
}
interface RowEmitter {
  on(event: "result", cb: (row: unknown[]) => void): RowEmitter;
  on(event: "error", cb: (err: Error) => void): RowEmitter;
  on(event: "end", cb: () => void): RowEmitter;
}

/**
 * Runs one query on knex's own connection (the transaction's, or one from the pool) and hands
 * each row, as an array in select order, to onRow as it arrives: no row objects, nothing held.
 * The binary protocol (prepared statement) sends DOUBLEs as their 8 bytes, so they come back
 * exactly and without text parsing.
 */
async function eachRow(conn: Db, sql: string, values: unknown[], onRow: (row: unknown[]) => void): Promise<void> {
  const client = conn.client as Knex.Client;
  const raw = (await client.acquireConnection()) as RawConnection;
  try {
    await new Promise<void>((resolve, reject) => {
      let failed: Error | null = null;
      raw
        .execute({ sql, rowsAsArray: true }, values)
        .on("result", (row) => {
          if (failed) return;
          try {
            onRow(row);
          } catch (err) {
            failed = err as Error;
          }
        })
        .on("error", reject)
        .on("end", () => (failed ? reject(failed) : resolve()));
    });
  } finally {
    await client.releaseConnection(raw);
  }
}

/** Most common step between consecutive starts, minutes (30 when there are too few rows to tell). */
function periodMinutesOf(startMs: Float64Array, n: number): number {
  const counts = new Map<number, number>();
  for (let i = 1; i < Math.min(n, 2001); i++) {
    const d = (startMs[i] as number) - (startMs[i - 1] as number);
    counts.set(d, (counts.get(d) ?? 0) + 1);
  }
  let best = 30 * 60_000;
  let bestCount = 0;
  for (const [d, c] of counts)
    if (c > bestCount || (c === bestCount && d < best)) {
      best = d;
      bestCount = c;
    }
  return best / 60_000;
}

/**
 * The stored half-hours of a site with period starts in [fromUtcMs, toUtcMs), as a HalfHourTable
 * in canonical units (NULL -> NaN). Tracers appear under their site_series names. Columns with no
 * value at all in the period are left out, as if the files had not had them. Streams one query
 * into the typed arrays, so memory stays near their size.
 * @param fromUtcMs inclusive, UTC epoch ms
 * @param toUtcMs exclusive, UTC epoch ms
 */
export async function loadHalfHours(siteId: number, fromUtcMs: number, toUtcMs: number, conn: Db = db): Promise<HalfHourTable> {
  const series = await listSiteSeries(siteId, conn);
  const names: string[] = [];
  const sqlCols: string[] = [];
  for (const [v, c] of Object.entries(MEASURE_COLUMNS)) {
    names.push(v);
    sqlCols.push(c);
  }
  for (const s of series) {
    // a tracer may not shadow a canonical variable
    if (s.slot < 1 || s.slot > TRACER_SLOTS || s.name in VARIABLES) continue;
    names.push(s.name);
    sqlCols.push(`tracer_${s.slot}`);
  }
  const from = new Date(fromUtcMs);
  const to = new Date(toUtcMs);
  const [countRows] = (await conn.raw(
    "SELECT COUNT(*) AS n FROM half_hours WHERE site_id = ? AND start_utc >= ? AND start_utc < ?",
    [siteId, from, to],
  )) as [Array<{ n: number | string }>];
  let capacity = Math.max(16, Number(countRows[0]?.n ?? 0));
  let startMs = new Float64Array(capacity);
  let cols = names.map(() => new Float64Array(capacity));
  const seen = new Uint8Array(names.length);
  let n = 0;

  // One streamed range scan on the primary key (site_id, start_utc), filling the arrays as rows
  // arrive; UNIX_TIMESTAMP is UTC in our sessions.
  const width = sqlCols.length;
  await eachRow(
    conn,
    `SELECT UNIX_TIMESTAMP(start_utc), ${sqlCols.join(", ")} FROM half_hours
      WHERE site_id = ? AND start_utc >= ? AND start_utc < ? ORDER BY start_utc`,
    [siteId, from, to],
    (row) => {
      if (n === capacity) {
        // rows arrived since the count (outside a transaction): grow
        capacity *= 2;
        const grow = (a: Float64Array) => {
          const b = new Float64Array(capacity);
          b.set(a);
          return b;
        };
        startMs = grow(startMs);
        cols = cols.map(grow);
      }
      startMs[n] = Number(row[0]) * 1000;
      for (let j = 0; j < width; j++) {
        const v = row[j + 1];
        if (typeof v === "number") {
          (cols[j] as Float64Array)[n] = v;
          seen[j] = 1;
        } else (cols[j] as Float64Array)[n] = Number.NaN;
      }
      n++;
    },
  );

  const table: HalfHourTable = {
    startMs: n === capacity ? startMs : startMs.slice(0, n),
    periodMinutes: periodMinutesOf(startMs, n),
    columns: {},
    units: {},
  };
  names.forEach((name, j) => {
    if (!seen[j]) return;
    const c = cols[j] as Float64Array;
    table.columns[name] = n === capacity ? c : c.slice(0, n);
    const known = VARIABLES[name as KnownVariable] as { unit: string } | undefined;
    table.units[name] = known ? known.unit : (series.find((s) => s.name === name)?.unit ?? "");
  });
  return table;
}
