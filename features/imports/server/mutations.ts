import "server-only";
import type { Knex } from "knex";
import { recordAudit } from "@/lib/db/audit";
import { db } from "@/lib/db/knex";
import { enqueueJob } from "@/lib/jobs/queue";
import { deleteObject } from "@/lib/storage/storage";
import type { ImportSettings, ImportSummary, OverlapChoice } from "@/features/imports/schemas";
import type { ImportSiteRow } from "@/features/imports/server/access";
import { getImport, getImportRow, splitSettings } from "@/features/imports/server/queries";
import { deleteImportHalfHours } from "@/features/imports/server/write";

export const IMPORT_JOB = "import";
export const RECOMPUTE_JOB = "recompute";

export type StartResult =
  | { kind: "queued"; importId: number; jobId: number }
  | { kind: "already"; importId: number; jobId: number | null; status: string; message: string };

/** Statuses after which the same bytes may be sent again and imported afresh. */
const RETRYABLE = new Set(["failed", "refused", "deleted", "purged"]);

/**
 * Records an upload that is already in storage and queues its import job. The same bytes
 * (SHA-256) already imported, or on their way, change nothing.
 */
export async function startImport(opts: {
  site: ImportSiteRow;
  userId: string;
  stored: { sha256: string; size: number; key: string };
  filename: string;
  settings: ImportSettings;
}): Promise<StartResult> {
  const { site, userId, stored, settings } = opts;
  const { mapping, options } = splitSettings(settings);
  const result = await retryOnRace(() =>
    db.transaction(async (trx): Promise<StartResult> => {
      const existing = (await trx("imports")
        .where({ site_id: site.id, sha256: stored.sha256 })
        .forUpdate()
        .first()) as { id: number; status: string; job_id: number | null; original_name: string } | undefined;
      if (existing && !RETRYABLE.has(existing.status) && !(await abandoned(trx, existing))) {
        const message =
          existing.status === "landed"
            ? `Already imported: this file (SHA-256 ${stored.sha256.slice(0, 12)}…) was imported as "${existing.original_name}". Nothing was changed.`
            : `Already being imported: this file (SHA-256 ${stored.sha256.slice(0, 12)}…) is on its way as "${existing.original_name}". Nothing was changed.`;
        return {
          kind: "already",
          importId: Number(existing.id),
          jobId: existing.job_id === null ? null : Number(existing.job_id),
          status: existing.status,
          message,
        };
      }
      const row = {
        site_id: site.id,
        sha256: stored.sha256,
        original_name: opts.filename.slice(0, 255),
        size_bytes: stored.size,
        storage_key: stored.key,
        mapping: mapping === null ? null : JSON.stringify(mapping),
        options: JSON.stringify(options),
        status: "queued" as const,
        overlap_choice: null,
        first_start_utc: null,
        last_start_utc: null,
        rows_written: 0,
        report: null,
        created_by: userId,
        created_at: new Date(),
        finished_at: null,
      };
      let importId: number;
      if (existing) {
        importId = Number(existing.id);
        await trx("imports").where({ id: importId }).update(row);
      } else {
        const [id] = await trx("imports").insert(row);
        importId = Number(id);
      }
      const jobId = await enqueueJob(
        {
          kind: IMPORT_JOB,
          groupId: site.group_id,
          siteId: site.id,
          payload: { importId },
          createdBy: userId,
        },
        trx,
      );
      await trx("imports").where({ id: importId }).update({ job_id: jobId });
      return { kind: "queued", importId, jobId: Number(jobId) };
    }),
  );
  if (result.kind === "queued") {
    await recordAudit({
      groupId: site.group_id,
      userId,
      action: "import.start",
      entityType: "import",
      entityId: String(result.importId),
      detail: { file: opts.filename, sha256: stored.sha256, size: stored.size },
    });
    if (settings.saveTemplate) await saveTemplate(site.id, userId, settings);
  }
  return result;
}

/**
 * An import left "queued" or "running" whose job has ended without it (failed after repeated
 * interruptions, cancelled): nothing will finish it, so it may be deleted or its bytes sent again.
 */
async function abandoned(
  conn: Knex | Knex.Transaction,
  imp: { status: string; job_id: number | null },
): Promise<boolean> {
  if (imp.status !== "queued" && imp.status !== "running") return false;
  if (imp.job_id === null) return true;
  const [rows] = (await conn.raw("SELECT status FROM jobs WHERE id = ?", [imp.job_id])) as [
    Array<{ status: string }>,
  ];
  const job = rows[0];
  return !job || job.status === "failed" || job.status === "cancelled";
}

/**
 * Runs `work` again when it lost a race on the unique (site, sha256) key: two uploads of the same
 * bytes at once both find no row, and one insert then fails (duplicate key, or a deadlock on the
 * gap both locked). The retry finds the winner's row and answers "already".
 */
async function retryOnRace<T>(work: () => Promise<T>, attempts = 5): Promise<T> {
  for (let i = 1; ; i++) {
    try {
      return await work();
    } catch (err) {
      const code = (err as { code?: string }).code;
      if (i >= attempts || (code !== "ER_DUP_ENTRY" && code !== "ER_LOCK_DEADLOCK")) throw err;
    }
  }
}

/** Saves the mapping part of the settings as the site's template. */
export async function saveTemplate(siteId: number, userId: string, settings: ImportSettings): Promise<void> {
  const template = {
    columns: settings.columns,
    missingCodes: settings.missingCodes,
    timestampConvention: settings.timestampConvention,
    utcOffsetHours: settings.utcOffsetHours,
  };
  await db("import_templates")
    .insert({
      site_id: siteId,
      template: JSON.stringify(template),
      updated_by: userId,
      updated_at: new Date(),
    })
    .onConflict("site_id")
    .merge();
}

/** Local dates (site clock) spanned by an import, with a day either side. */
function periodOf(
  imp: { first_start_utc: Date | null; last_start_utc: Date | null },
  offsetHours: number,
): { from: string; to: string } | null {
  if (!imp.first_start_utc || !imp.last_start_utc) return null;
  const d = (ms: number) => new Date(ms + offsetHours * 3_600_000).toISOString().slice(0, 10);
  return {
    from: d(new Date(imp.first_start_utc).getTime() - 86_400_000),
    to: d(new Date(imp.last_start_utc).getTime() + 86_400_000),
  };
}

/** Queues a recompute of the evenings of a period (site clock dates, inclusive). */
export async function queueRecompute(
  site: ImportSiteRow,
  userId: string,
  from: string,
  to: string,
): Promise<number> {
  const jobId = await enqueueJob({
    kind: RECOMPUTE_JOB,
    groupId: site.group_id,
    siteId: site.id,
    payload: { siteId: site.id, from, to },
    createdBy: userId,
  });
  await recordAudit({
    groupId: site.group_id,
    userId,
    action: "evenings.recompute",
    entityType: "site",
    entityId: String(site.id),
    detail: { from, to, jobId },
  });
  return Number(jobId);
}

export type DeleteResult =
  | { ok: true; import: ImportSummary; recomputeJobId: number | null }
  | { ok: false; status: number; message: string };

/**
 * Deletes an import's rows (the original stays in storage); with `purge` (a lead) the original
 * goes too, unless another import still refers to the same bytes. The evenings of its period
 * are recomputed in the background.
 */
export async function deleteImport(
  site: ImportSiteRow,
  userId: string,
  importId: number,
  purge: boolean,
): Promise<DeleteResult> {
  const before = await getImportRow(importId);
  if (!before || before.site_id !== site.id) return { ok: false, status: 404, message: "Not found." };
  const row = before as typeof before & { first_start_utc: Date | null; last_start_utc: Date | null };
  if ((row.status === "queued" || row.status === "running") && !(await abandoned(db, row)))
    return { ok: false, status: 409, message: "This import is still running; wait for it to finish." };
  if (row.status === "purged") return { ok: false, status: 409, message: "This import was already purged." };
  if (row.status === "deleted" && !purge)
    return { ok: false, status: 409, message: "This import was already deleted." };
  const hadRows = row.status === "landed";
  await db.transaction(async (trx) => {
    if (hadRows) await deleteImportHalfHours(trx, site.id, importId);
    await trx("imports")
      .where({ id: importId })
      .update({ status: purge ? "purged" : "deleted" });
  });
  if (purge) {
    const others = (await db("imports")
      .where({ storage_key: row.storage_key })
      .whereNot({ id: importId })
      .whereNot({ status: "purged" })
      .count({ n: "*" })
      .first()) as { n: number | string } | undefined;
    if (Number(others?.n ?? 0) === 0) await deleteObject(row.storage_key);
  }
  await recordAudit({
    groupId: site.group_id,
    userId,
    action: purge ? "import.purge" : "import.delete",
    entityType: "import",
    entityId: String(importId),
    detail: { file: row.original_name, rows: row.rows_written },
  });
  const period = hadRows ? periodOf(row, Number(site.utc_offset_hours)) : null;
  const recomputeJobId = period ? await queueRecompute(site, userId, period.from, period.to) : null;
  const after = await getImport(site.id, importId);
  return { ok: true, import: after as ImportSummary, recomputeJobId };
}

/** Answers the overlap question of an import that stopped to ask. */
export async function resolveOverlap(
  site: ImportSiteRow,
  userId: string,
  importId: number,
  choice: OverlapChoice,
): Promise<{ ok: true; jobId: number | null } | { ok: false; message: string }> {
  return db.transaction(async (trx) => {
    const row = (await trx("imports").where({ id: importId, site_id: site.id }).forUpdate().first()) as
      { status: string; report: unknown } | undefined;
    if (!row) return { ok: false as const, message: "Not found." };
    if (row.status !== "pending")
      return { ok: false as const, message: "This import is not waiting for a choice." };
    if (choice === "cancel") {
      await trx("imports")
        .where({ id: importId })
        .update({ status: "refused", overlap_choice: "cancel", finished_at: new Date() });
      return { ok: true as const, jobId: null };
    }
    const jobId = await enqueueJob(
      { kind: IMPORT_JOB, groupId: site.group_id, siteId: site.id, payload: { importId }, createdBy: userId },
      trx,
    );
    await trx("imports")
      .where({ id: importId })
      .update({ status: "queued", overlap_choice: choice, job_id: jobId });
    return { ok: true as const, jobId: Number(jobId) };
  });
}
