import "server-only";
import { jsonColumn } from "@/lib/db/json";
import { db } from "@/lib/db/knex";
import type { JobRow } from "@/lib/db/tables";
import type { ColumnMapping } from "@/lib/series/recognize";
import {
  templateSchema,
  type ImportReport,
  type ImportSettings,
  type ImportStatus,
  type ImportSummary,
  type ImportTemplate,
  type JobView,
} from "@/features/imports/schemas";
import type { ImportRow } from "@/features/imports/server/pipeline";

type ImportDbRow = ImportRow & {
  first_start_utc: Date | null;
  last_start_utc: Date | null;
  created_at: Date;
  finished_at: Date | null;
  created_by_name?: string | null;
  job_status?: string | null;
};

/**
 * The status people see: an import still "queued" or "running" whose job has ended without it
 * (stopped after repeated interruptions, or cancelled) will not finish, so it shows as failed.
 */
function shownStatus(row: ImportDbRow): ImportStatus {
  const open = row.status === "queued" || row.status === "running";
  if (open && (row.job_status === "failed" || row.job_status === "cancelled")) return "failed";
  return row.status as ImportStatus;
}

const iso = (d: Date | null | undefined): string | null => (d ? new Date(d).toISOString() : null);

/** Row to client shape (dates as ISO strings). */
export function toImportSummary(row: ImportDbRow): ImportSummary {
  return {
    id: Number(row.id),
    siteId: row.site_id,
    originalName: row.original_name,
    sizeBytes: Number(row.size_bytes),
    sha256: row.sha256,
    status: shownStatus(row),
    jobId: row.job_id === null ? null : Number(row.job_id),
    overlapChoice: row.overlap_choice,
    firstStartUtc: iso(row.first_start_utc),
    lastStartUtc: iso(row.last_start_utc),
    rowsWritten: Number(row.rows_written),
    createdAt: iso(row.created_at) ?? "",
    finishedAt: iso(row.finished_at),
    createdBy: row.created_by_name ?? null,
    report: jsonColumn<ImportReport>(row.report),
  };
}

function importQuery() {
  return db("imports as i")
    .leftJoin("users as u", "u.id", "i.created_by")
    .leftJoin("jobs as j", "j.id", "i.job_id")
    .select("i.*", "u.display_name as created_by_name", "j.status as job_status");
}

/** Imports of a site, newest first (the history every member sees). */
export async function listImports(siteId: number, limit = 50): Promise<ImportSummary[]> {
  const rows = (await importQuery()
    .where("i.site_id", siteId)
    .orderBy("i.id", "desc")
    .limit(limit)) as ImportDbRow[];
  return rows.map(toImportSummary);
}

/** One import of a site, or null. */
export async function getImport(siteId: number, importId: number): Promise<ImportSummary | null> {
  const row = (await importQuery().where({ "i.site_id": siteId, "i.id": importId }).first()) as
    ImportDbRow | undefined;
  return row ? toImportSummary(row) : null;
}

export async function getImportRow(importId: number): Promise<ImportRow | null> {
  return ((await db("imports").where({ id: importId }).first()) as ImportRow | undefined) ?? null;
}

/** The site's saved mapping, or null. */
export async function getTemplate(siteId: number): Promise<ImportTemplate | null> {
  const row = await db<{ site_id: number; template: unknown }>("import_templates")
    .where({ site_id: siteId })
    .first("template");
  if (!row) return null;
  const parsed = templateSchema.safeParse(jsonColumn(row.template));
  return parsed.success ? parsed.data : null;
}

/** Mapping and options as stored on the import row. */
export function splitSettings(settings: ImportSettings): {
  mapping: ColumnMapping | null;
  options: Omit<ImportSettings, "columns">;
} {
  const { columns, ...options } = settings;
  return { mapping: (columns as ColumnMapping | undefined) ?? null, options };
}

/** A job row and its group (for the caller's role check), or null. */
export async function getJobRow(jobId: number): Promise<JobRow | null> {
  return (await db("jobs").where({ id: jobId }).first()) ?? null;
}

/** A job as the API shows it, with its import when it is an import job. */
export async function jobView(job: JobRow): Promise<JobView> {
  let summary: ImportSummary | null = null;
  const payload = jsonColumn<{ importId?: number }>(job.payload);
  if (payload?.importId !== undefined && job.site_id !== null)
    summary = await getImport(job.site_id, Number(payload.importId));
  return {
    id: Number(job.id),
    kind: job.kind,
    status: job.status,
    phase: job.phase,
    progress: { done: Number(job.progress_done), total: Number(job.progress_total), unit: job.progress_unit },
    message: job.message,
    createdAt: iso(job.created_at) ?? "",
    startedAt: iso(job.started_at),
    finishedAt: iso(job.finished_at),
    result: jsonColumn(job.result),
    import: summary,
  };
}
