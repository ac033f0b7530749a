"use client";

import { useQuery } from "@tanstack/react-query";
import { useEffect } from "react";
import type { JobView } from "@/features/imports/schemas";
import { jobOptions } from "@/features/imports/queries";

const PHASES: Record<string, string> = {
  queued: "Waiting for the worker",
  starting: "Starting",
  reading: "Reading and validating",
  checking: "Checking for overlap with stored data",
  writing: "Writing rows",
  classifying: "Classifying evenings",
  done: "Finished",
  failed: "Failed",
  cancelled: "Cancelled",
};

const nf = new Intl.NumberFormat("en-GB");

/** A progress bar: `value` of `max`, with the text beside it. */
export function Bar({ label, value, max, text }: { label: string; value: number; max: number; text: string }) {
  const pct = max > 0 ? Math.min(100, Math.round((value / max) * 100)) : 0;
  return (
    <div className="space-y-1">
      <div className="flex justify-between gap-3 text-xs text-ink-muted">
        <span>{label}</span>
        <span className="tabular-nums">{text}</span>
      </div>
      <div role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} className="h-2.5 overflow-hidden rounded-full bg-surface-sunken">
        <div className="h-full rounded-full bg-dusk-600 transition-[width] duration-300 dark:bg-dusk-300" style={{ width: `${pct}%` }} />
      </div>
    </div>
  );
}

/** Follows a background job by polling GET /api/jobs/:id; calls onSettled once it ends. */
export function JobProgress({ jobId, onSettled }: { jobId: number; onSettled?: (job: JobView) => void }) {
  const { data: job, error } = useQuery(jobOptions(jobId));
  const settled = job && job.status !== "queued" && job.status !== "running";
  useEffect(() => {
    if (settled && job) onSettled?.(job);
    // eslint-disable-next-line react-hooks/exhaustive-deps -- once per settled job
  }, [settled, job?.id]);
  if (error) return <p className="text-sm text-red-700 dark:text-red-300">Could not read the job: {error.message}</p>;
  if (!job) return <p className="text-sm text-ink-muted">Waiting for the job...</p>;
  const { done, total, unit } = job.progress;
  const phase = PHASES[job.phase] ?? job.phase;
  const text = total > 0 ? `${nf.format(done)} / ${nf.format(total)} ${unit === "bytes" ? "bytes" : unit}` : unit === "evenings" && done > 0 ? `${nf.format(done)} evenings` : "";
  return (
    <div className="space-y-2" data-testid="job-progress" data-status={job.status}>
      {job.status === "done" ? (
        <p className="text-sm font-medium text-emerald-800 dark:text-emerald-300">✓ {job.kind === "import" ? "Import finished" : "Finished"}</p>
      ) : job.status === "failed" || job.status === "cancelled" ? (
        <p role="alert" className="text-sm font-medium text-red-800 dark:text-red-300">
          ✕ {job.message ?? PHASES[job.status]}
        </p>
      ) : (
        <Bar label={phase} value={job.status === "queued" ? 0 : done} max={total} text={text} />
      )}
    </div>
  );
}
