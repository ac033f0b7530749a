import "server-only";
import { Readable } from "node:stream";
import type { Knex } from "knex";
import { jsonColumn } from "@/lib/db/json";
import { db } from "@/lib/db/knex";
import { recomputeEvenings } from "@/lib/evenings/recompute";
import { enqueueAnomalyDetection } from "@/lib/anomalies/server/enqueue";
import { readTable, TableError } from "@/lib/series/reader";
import { isKnownVariable } from "@/lib/series/recognize";
import type { HalfHourTable } from "@/lib/series/types";
import { getObject, putObject } from "@/lib/storage/storage";
import type { ColumnMapping } from "@/lib/series/recognize";
import type { ImportReport, ImportSettings, OverlapChoice } from "@/features/imports/schemas";
import { refusalReport, rejectedCsv, reportFromRead } from "@/features/imports/server/report";
import { planColumns, writeHalfHours } from "@/features/imports/server/write";

/** Progress as the job shows it. */
export type Progress = (
  phase: string,
  done: number,
  total: number,
  unit: "rows" | "bytes" | "evenings",
) => Promise<void> | void;

export type ImportRow = {
  id: number;
  site_id: number;
  sha256: string;
  original_name: string;
  size_bytes: number;
  storage_key: string;
  mapping: ColumnMapping | string | null;
  options: ImportSettings | string | null;
  status: string;
  job_id: number | null;
  overlap_choice: OverlapChoice | null;
  rows_written: number;
  report: ImportReport | string | null;
  created_by: string | null;
};

/** Outcome of one run of the import job. */
export type ImportOutcome =
  | { outcome: "landed"; importId: number; rows: number; evenings: number }
  | { outcome: "already"; importId: number }
  | { outcome: "needs_choice"; importId: number; existingRows: number }
  | { outcome: "cancelled"; importId: number };

/** A refusal (bad file) or failure that the job reports with this message. */
export class ImportFailure extends Error {
  constructor(message: string) {
    super(message);
    this.name = "ImportFailure";
  }
}

const MAX_TRACERS = 8;

/** The site's series slot of each tracer, adding rows for new names (inside `trx`). */
async function tracerSlots(
  trx: Knex.Transaction,
  siteId: number,
  table: HalfHourTable,
): Promise<Map<string, number>> {
  const names = Object.keys(table.columns).filter((n) => !isKnownVariable(n));
  const slots = new Map<string, number>();
  if (names.length === 0) return slots;
  const rows = await trx<{ site_id: number; slot: number; name: string }>("site_series")
    .where({ site_id: siteId })
    .forUpdate()
    .select("slot", "name");
  for (const r of rows) slots.set(r.name.toUpperCase(), r.slot);
  const used = new Set(rows.map((r) => r.slot));
  const out = new Map<string, number>();
  for (const name of names) {
    let slot = slots.get(name.toUpperCase());
    if (slot === undefined) {
      slot = [1, 2, 3, 4, 5, 6, 7, 8].find((s) => !used.has(s));
      if (slot === undefined) {
        throw new ImportFailure(
          `The site already has ${MAX_TRACERS} tracer series; ${name} has no free slot. Leave a tracer column out of the mapping.`,
        );
      }
      used.add(slot);
      const unit = (table.units[name] ?? "").slice(0, 32);
      // Names of fluxes start with F (FC, FCH4, F_O3): common practice.
      const kind = /^F[_A-Z]/.test(name) ? "flux" : "concentration";
      await trx("site_series").insert({ site_id: siteId, slot, name, unit, kind });
    }
    out.set(name, slot);
  }
  return out;
}

function localDate(ms: number, offsetHours: number): string {
  return new Date(ms + offsetHours * 3_600_000).toISOString().slice(0, 10);
}

function describeDbError(err: unknown): string {
  const e = err as { code?: string; message?: string; fatal?: boolean };
  const lost =
    e.code === "PROTOCOL_CONNECTION_LOST" ||
    e.code === "ECONNRESET" ||
    e.code === "ER_CONNECTION_KILLED" ||
    e.code === "EPIPE" ||
    /closed state|connection lost|killed/i.test(e.message ?? "");
  if (lost) return "the database connection was lost while the rows were being written";
  if (e.code === "ER_LOCK_WAIT_TIMEOUT" || e.code === "ER_LOCK_DEADLOCK")
    return "the database was busy with another write to this site";
  if (/did not take every row/.test(e.message ?? ""))
    return `${e.message} (another import of the same periods may have landed meanwhile)`;
  return `the database refused the rows (${e.code ?? "error"})`;
}

/** How long a run waits for another run of the same import to finish writing, s. */
const IMPORT_LOCK_WAIT_S = 600;

/** Records a failure, unless another run of the import has landed it meanwhile. */
async function setImportUnlessLanded(id: number, patch: Record<string, unknown>): Promise<void> {
  const values: Record<string, unknown> = { ...patch };
  if (values.report !== undefined && values.report !== null) values.report = JSON.stringify(values.report);
  await db("imports").where({ id }).whereNot({ status: "landed" }).update(values);
}

async function setImport(
  id: number,
  patch: Record<string, unknown>,
  trx: Knex | Knex.Transaction = db,
): Promise<void> {
  const values: Record<string, unknown> = { ...patch };
  if (values.report !== undefined && values.report !== null) values.report = JSON.stringify(values.report);
  await trx("imports").where({ id }).update(values);
}

/**
 * Runs one import from its stored original: read and validate (streaming), refuse a file with
 * no usable timestamp or nothing recognised, stop at an overlap without a choice, write every
 * row in one transaction, then classify the evenings the rows touch. Safe to run again after a
 * crash: nothing is written unless the whole transaction commits.
 */
export async function runImport(importId: number, progress: Progress): Promise<ImportOutcome> {
  const imp = (await db("imports").where({ id: importId }).first()) as ImportRow | undefined;
  if (!imp) throw new ImportFailure(`Import ${importId} does not exist.`);
  if (imp.status === "landed") return { outcome: "already", importId };
  const site = await db("sites").where({ id: imp.site_id }).first();
  if (!site) throw new ImportFailure("The site of this import no longer exists.");
  const settings = jsonColumn<ImportSettings>(imp.options) ?? {};
  const columns = jsonColumn<ColumnMapping>(imp.mapping) ?? undefined;
  const offset = settings.utcOffsetHours ?? Number(site.utc_offset_hours);

  // A second run of the same import finds "running" and leaves the row alone: an update would wait
  // on the first run's lock and could overwrite the "landed" it commits.
  if (imp.status !== "running") await setImportUnlessLanded(importId, { status: "running" });
  await progress("reading", 0, imp.size_bytes, "bytes");

  // ---- read and validate, streaming from storage
  let read: Awaited<ReturnType<typeof readTable>> | undefined;
  try {
    const stream = await getObject(imp.storage_key);
    let last = 0;
    read = await readTable(stream, {
      utcOffsetHours: offset,
      mapping: columns,
      missingCodes:
        settings.missingCodes && settings.missingCodes.length > 0 ? settings.missingCodes : undefined,
      timestampConvention: settings.timestampConvention,
      sizeHintBytes: imp.size_bytes,
      maxRejected: 100_000,
      onProgress: (_rows, bytes) => {
        if (bytes - last >= 4_000_000) {
          last = bytes;
          void Promise.resolve(progress("reading", bytes, imp.size_bytes, "bytes")).catch(() => undefined);
        }
      },
    });
  } catch (err) {
    if (err instanceof TableError) {
      const message = `Refused: ${err.message}${err.row !== null ? ` (line ${err.row})` : ""}. Nothing was written.`;
      await setImportUnlessLanded(importId, {
        status: "refused",
        report: refusalReport(err.row, err.message),
        finished_at: new Date(),
      });
      throw new ImportFailure(message);
    }
    throw err;
  }
  const readReport = read.report;
  const n = read.table.startMs.length;
  const first = read.table.startMs[0] as number;
  const lastStart = read.table.startMs[n - 1] as number;
  // Held in a box that is emptied once the rows are written: classifying reads them back, and
  // two copies of a large file at once would double the peak memory.
  const held: { table: HalfHourTable | null } = { table: read.table };
  read = undefined;

  // ---- the full rejected list, kept beside the original
  let rejectedKey: string | null = null;
  if (readReport.rejected.length > 0) {
    const stored = await putObject(
      Readable.from(rejectedCsv(readReport.rejected, readReport.rejectedNotListed)),
    );
    rejectedKey = stored.key;
  }
  const report = reportFromRead(readReport, rejectedKey);

  // ---- overlap with data already stored for the site
  await progress("checking", 0, n, "rows");
  const existing = (await db("half_hours")
    .where({ site_id: imp.site_id })
    .whereBetween("start_utc", [new Date(first), new Date(lastStart)])
    // rows of this very import exist only if another run landed it meanwhile (found under the lock below)
    .whereRaw("(import_id IS NULL OR import_id <> ?)", [importId])
    .count({ n: "*" })
    .first()) as { n: number | string } | undefined;
  const existingRows = Number(existing?.n ?? 0);
  let choice: OverlapChoice | null = null;
  if (existingRows > 0) {
    report.overlap = {
      existingRows,
      from: new Date(first).toISOString(),
      to: new Date(lastStart).toISOString(),
    };
    const wanted = imp.overlap_choice ?? settings.overlap ?? "cancel";
    if (wanted === "ask") {
      await setImportUnlessLanded(importId, {
        status: "pending",
        report,
        first_start_utc: new Date(first),
        last_start_utc: new Date(lastStart),
      });
      return { outcome: "needs_choice", importId, existingRows };
    }
    if (wanted === "cancel") {
      report.refusal = {
        row: null,
        message: `The file overlaps ${existingRows} half-hours already stored for this site (${report.overlap.from} to ${report.overlap.to}); cancelled, nothing was written. Choose "replace" or "keep" to import it.`,
      };
      await setImportUnlessLanded(importId, {
        status: "refused",
        overlap_choice: "cancel",
        report,
        finished_at: new Date(),
      });
      return { outcome: "cancelled", importId };
    }
    choice = wanted;
  }

  // ---- write: all rows or none
  await progress("writing", 0, n, "rows");
  let written: number;
  try {
    const landed = await db.transaction(async (trx): Promise<number | "already"> => {
      // Another run of this import (a second worker, a job re-queued while its first worker still
      // writes) waits here until that run commits or rolls back, then finds the rows landed.
      const [locked] = (await trx.raw(
        `SELECT status FROM imports WHERE id = ? FOR UPDATE WAIT ${IMPORT_LOCK_WAIT_S}`,
        [importId],
      )) as [Array<{ status: string }>];
      if (locked[0]?.status === "landed") return "already";
      const table = held.table;
      if (!table) throw new Error("the parsed table is gone");
      const slots = await tracerSlots(trx, imp.site_id, table);
      const plan = planColumns(table, slots);
      const rows = await writeHalfHours(trx, imp.site_id, importId, table, plan, choice, (done) =>
        progress("writing", done, n, "rows"),
      );
      report.written = { rows, choice };
      await setImport(
        importId,
        {
          status: "landed",
          overlap_choice: choice,
          rows_written: rows,
          first_start_utc: new Date(first),
          last_start_utc: new Date(lastStart),
          report,
          finished_at: new Date(),
        },
        trx,
      );
      return rows;
    });
    if (landed === "already") return { outcome: "already", importId };
    written = landed;
  } catch (err) {
    if (err instanceof ImportFailure) {
      await setImportUnlessLanded(importId, {
        status: "failed",
        report: { ...report, refusal: { row: null, message: err.message } },
        finished_at: new Date(),
      });
      throw err;
    }
    const why = describeDbError(err);
    console.error(`import ${importId}: write failed`, err);
    const message = `Import failed: ${why}. The transaction was rolled back, so none of its rows were stored; run the import again.`;
    await setImportUnlessLanded(importId, {
      status: "failed",
      report: { ...report, refusal: { row: null, message } },
      finished_at: new Date(),
    }).catch(() => undefined);
    throw new ImportFailure(message);
  }
  held.table = null;

  // ---- classify the evenings the rows touch (with a day either side for the windows)
  const fromDate = localDate(first - 86_400_000, Number(site.utc_offset_hours));
  const toDate = localDate(lastStart + 86_400_000, Number(site.utc_offset_hours));
  await progress("classifying", 0, 0, "evenings");
  const result = await recomputeEvenings(imp.site_id, fromDate, toDate, {
    onProgress: (done, total) => progress("classifying", done, total, "evenings"),
  });
  const computed = result.computed;
  report.evenings = { computed, from: fromDate, to: toDate };
  await setImport(importId, { report });
  await enqueueAnomalyDetection(imp.site_id, fromDate, toDate);
  return { outcome: "landed", importId, rows: written, evenings: computed };
}
