import "server-only";
import type { JobHandler } from "@/lib/jobs/worker";
import { recomputeEvenings } from "@/lib/evenings/recompute";
import { runImport } from "@/features/imports/server/pipeline";
import { IMPORT_JOB, RECOMPUTE_JOB } from "@/features/imports/server/mutations";

/*
 * Job handlers of the import feature; scripts/worker.ts registers them by kind.
 *   import:    payload { importId }             -> ImportOutcome
 *   recompute: payload { siteId, from, to }     -> { computed } (local dates, inclusive)
 */

const importHandler: JobHandler = async (job, ctx) => {
  const payload = job.payload as { importId?: unknown } | null;
  const importId = Number(payload?.importId);
  if (!Number.isInteger(importId) || importId <= 0) throw new Error("The job names no import.");
  return runImport(importId, (phase, done, total, unit) => {
    if (ctx.signal.aborted) throw new Error("The import job was cancelled.");
    return ctx.progress({ phase, done, total, unit });
  });
};

const recomputeHandler: JobHandler = async (job, ctx) => {
  const p = job.payload as { siteId?: unknown; from?: unknown; to?: unknown } | null;
  const siteId = Number(p?.siteId ?? job.siteId);
  if (!Number.isInteger(siteId) || typeof p?.from !== "string" || typeof p.to !== "string") throw new Error("The job names no site and period.");
  await ctx.progress({ phase: "classifying", done: 0, total: 0, unit: "evenings" });
  return recomputeEvenings(siteId, p.from, p.to, {
    onProgress: (done, total) => ctx.progress({ phase: "classifying", done, total, unit: "evenings" }),
  });
};

/** Handlers by job kind, for the worker. */
export const importJobHandlers: Readonly<Record<string, JobHandler>> = {
  [IMPORT_JOB]: importHandler,
  [RECOMPUTE_JOB]: recomputeHandler,
};
