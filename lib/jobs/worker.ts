import "server-only";
import { hostname } from "node:os";
import { randomBytes } from "node:crypto";
import { db } from "@/lib/db/knex";
import { describeDatabaseError, isDatabaseUnavailable } from "@/lib/db/errors";
import {
  claimNextJob,
  failJob,
  finishJob,
  heartbeat,
  recoverStaleJobs,
  reportProgress,
  type Job,
  type Progress,
} from "@/lib/jobs/queue";

/** What a handler gets besides its job. */
export interface JobContext {
  workerId: string;
  /** aborted when the job is cancelled or taken away from this worker; stop soon and throw */
  signal: AbortSignal;
  /**
   * Reports phase and progress. Calls are coalesced to one write per `progressMs` unless the
   * phase changes or the work is complete, so handlers may call it per batch.
   */
  progress(p: Progress): Promise<void>;
}

/** Runs one job and returns its result (stored as JSON); a thrown error fails the job with its message. */
export type JobHandler = (job: Job, ctx: JobContext) => Promise<unknown>;

export interface WorkerOptions {
  /** handler per job kind; the worker claims only these kinds */
  handlers: Readonly<Record<string, JobHandler>>;
  workerId?: string;
  /** wait between polls when the queue is empty, ms (default 1000) */
  pollMs?: number;
  /** heartbeat interval while a job runs, ms (default 5000) */
  heartbeatMs?: number;
  /** a running job with no heartbeat for this long lost its worker, ms (default 30000) */
  staleMs?: number;
  /** minimum interval between progress writes, ms (default 250) */
  progressMs?: number;
  /** stops the loop after the current job */
  signal?: AbortSignal;
  /** runOnce only: claim only one of these jobs (a test running the job it made) */
  jobIds?: readonly number[];
  log?: (message: string) => void;
}

export type RunOutcome = {
  jobId: number;
  kind: string;
  status: "done" | "failed" | "cancelled";
  message?: string;
};

/** A worker id unique per process: host, pid and a random tag (fits jobs.locked_by). */
export function newWorkerId(): string {
  return `${hostname().slice(0, 40)}:${process.pid}:${randomBytes(3).toString("hex")}`;
}

function errorMessage(err: unknown): string {
  if (err instanceof Error) return err.message || err.name;
  return String(err);
}

/**
 * Claims and runs at most one job. Returns null when no job of the handled kinds was queued.
 * Used by runWorker and directly by tests.
 */
export async function runOnce(opts: WorkerOptions): Promise<RunOutcome | null> {
  const workerId = opts.workerId ?? newWorkerId();
  const log = opts.log ?? (() => {});
  const job = await claimNextJob(workerId, Object.keys(opts.handlers), opts.jobIds);
  if (!job) return null;
  const handler = opts.handlers[job.kind];
  if (!handler) {
    await failJob(job.id, `No handler for job kind "${job.kind}".`, { workerId });
    return { jobId: job.id, kind: job.kind, status: "failed", message: "no handler" };
  }

  const abort = new AbortController();
  const heartbeatMs = opts.heartbeatMs ?? 5000;
  const progressMs = opts.progressMs ?? 250;
  let lost = false;
  const beat = setInterval(() => {
    heartbeat(job.id, workerId)
      .then((mine) => {
        if (!mine && !abort.signal.aborted) {
          lost = true;
          abort.abort(new Error("The job was cancelled or taken over."));
        }
      })
      .catch((err: unknown) => log(`heartbeat of job ${job.id} failed: ${errorMessage(err)}`));
  }, heartbeatMs);
  beat.unref?.();

  let lastWrite = 0;
  let lastPhase = "";
  const ctx: JobContext = {
    workerId,
    signal: abort.signal,
    async progress(p) {
      const t = Date.now();
      const final = p.total > 0 && p.done >= p.total;
      if (p.phase === lastPhase && !final && t - lastWrite < progressMs) return;
      lastWrite = t;
      lastPhase = p.phase;
      await reportProgress(job.id, p);
    },
  };

  log(`job ${job.id} (${job.kind}) started`);
  try {
    const result = await handler(job, ctx);
    clearInterval(beat);
    if (lost || !(await finishJob(job.id, result, { workerId }))) {
      log(`job ${job.id} finished but is no longer ours (cancelled or re-queued); result dropped`);
      return { jobId: job.id, kind: job.kind, status: "cancelled" };
    }
    log(`job ${job.id} done`);
    return { jobId: job.id, kind: job.kind, status: "done" };
  } catch (err) {
    clearInterval(beat);
    if (lost) return { jobId: job.id, kind: job.kind, status: "cancelled" };
    const message = errorMessage(err);
    log(`job ${job.id} failed: ${message}`);
    try {
      await failJob(job.id, message, { workerId });
    } catch (e) {
      // The database may be the thing that broke; the stale heartbeat re-queues the job later.
      log(`could not record the failure of job ${job.id}: ${errorMessage(e)}`);
    }
    return { jobId: job.id, kind: job.kind, status: "failed", message };
  }
}

function pidAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === "EPERM";
  }
}

/**
 * Running jobs locked by a worker process of this host that no longer exists are orphans at
 * once; clearing their heartbeat lets recoverStaleJobs re-queue them without waiting.
 * With `kinds`, only jobs of those kinds. Returns how many were marked.
 */
export async function releaseJobsOfDeadLocalWorkers(kinds?: readonly string[]): Promise<number> {
  const host = hostname().slice(0, 40);
  const q = db("jobs").where({ status: "running" });
  if (kinds) q.whereIn("kind", [...kinds]);
  const rows: Array<{ id: number; locked_by: string }> = await q
    .andWhere("locked_by", "like", `${host.replace(/[\\%_]/g, "\\$&")}:%`)
    .select("id", "locked_by");
  const dead = rows.filter((r) => {
    const pid = Number(r.locked_by.slice(host.length + 1).split(":")[0]);
    return Number.isInteger(pid) && pid > 0 && pid !== process.pid && !pidAlive(pid);
  });
  if (dead.length === 0) return 0;
  return db("jobs")
    .whereIn(
      "id",
      dead.map((r) => r.id),
    )
    .andWhere({ status: "running" })
    .update({ heartbeat_at: null });
}

function sleep(ms: number, signal?: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    if (signal?.aborted) return resolve();
    const t = setTimeout(done, ms);
    function done() {
      clearTimeout(t);
      signal?.removeEventListener("abort", done);
      resolve();
    }
    signal?.addEventListener("abort", done, { once: true });
  });
}

/** Pause after `failures` failed rounds in a row: 2 s doubling up to 30 s (never below `pollMs`), ms. */
export function backoffMs(failures: number, pollMs = 0): number {
  return Math.max(pollMs, Math.min(30_000, 2000 * 2 ** Math.max(0, failures - 1)));
}

/**
 * The worker loop: re-queues jobs orphaned by a previous worker (stale heartbeat), then claims
 * and runs jobs one at a time until `signal` aborts. Database errors are logged and retried
 * with backoff (backoffMs), so a restart of the database does not end the worker.
 */
export async function runWorker(opts: WorkerOptions): Promise<void> {
  const workerId = opts.workerId ?? newWorkerId();
  const log = opts.log ?? (() => {});
  const pollMs = opts.pollMs ?? 1000;
  const staleMs = opts.staleMs ?? 30_000;
  const recoverEveryMs = Math.max(pollMs, Math.min(staleMs, 10_000));
  let lastRecovery = 0;
  let failures = 0;
  log(`worker ${workerId} handling ${Object.keys(opts.handlers).join(", ") || "nothing"}`);
  try {
    const n = await releaseJobsOfDeadLocalWorkers(Object.keys(opts.handlers));
    if (n) log(`found ${n} job(s) left running by a stopped worker`);
  } catch (err) {
    log(`could not check for orphaned jobs: ${errorMessage(err)}`);
  }
  while (!opts.signal?.aborted) {
    try {
      if (Date.now() - lastRecovery >= recoverEveryMs) {
        lastRecovery = Date.now();
        const { requeued, failed } = await recoverStaleJobs(staleMs, Object.keys(opts.handlers));
        if (requeued.length) log(`re-queued interrupted job(s) ${requeued.join(", ")}`);
        if (failed.length) log(`failed job(s) ${failed.join(", ")} after repeated interruptions`);
      }
      const outcome = await runOnce({ ...opts, workerId });
      if (failures > 0) log(`database reachable again after ${failures} failed round(s); carrying on`);
      failures = 0;
      if (!outcome) await sleep(pollMs, opts.signal);
    } catch (err) {
      failures++;
      const delay = backoffMs(failures, pollMs);
      // One line per round, not a stack: an outage of minutes should not flood the log.
      if (isDatabaseUnavailable(err))
        log(`database unavailable (${describeDatabaseError(err)}); retrying in ${delay / 1000} s`);
      else log(`worker error: ${errorMessage(err)}; retrying in ${delay / 1000} s`);
      await sleep(delay, opts.signal);
    }
  }
  log(`worker ${workerId} stopped`);
}
