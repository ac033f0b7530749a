import "server-only";
import type { JobHandler } from "@/lib/jobs/worker";
import { ANOMALY_JOB_KIND } from "@/lib/anomalies/server/enqueue";
import { runAnomalyDetection } from "@/lib/anomalies/server/run";
import { anomalyJobPayloadSchema } from "@/features/anomalies/schemas";

/*
 * Job handler of the anomaly screen; scripts/worker.ts registers it by kind.
 *   anomalies: payload { from, to } (local dates, inclusive, null = open) -> DetectionResult
 */

const anomaliesHandler: JobHandler = async (job, ctx) => {
  if (job.siteId === null) throw new Error("The job names no site.");
  const payload = anomalyJobPayloadSchema.parse(job.payload ?? {});
  return runAnomalyDetection(job.siteId, payload, async (p) => {
    if (ctx.signal.aborted) throw new Error("The anomaly job was cancelled.");
    await ctx.progress({ phase: p.phase, done: p.done, total: p.total, unit: "evenings" });
  });
};

/** Handlers by job kind, for the worker. */
export const anomalyJobHandlers: Readonly<Record<string, JobHandler>> = {
  [ANOMALY_JOB_KIND]: anomaliesHandler,
};
