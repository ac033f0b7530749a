import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";
import { jsonColumn } from "@/lib/db/json";
import type { JobRow } from "@/lib/db/tables";

/*
 * A job queue in MariaDB. A worker claims the oldest queued job of the kinds it handles with
 * SELECT ... FOR UPDATE SKIP LOCKED, so concurrent workers never take the same job and never
 * wait on each other. A running job proves it is alive through heartbeat_at; one whose worker
 * vanished is re-queued by recoverStaleJobs, and fails after MAX_ATTEMPTS interruptions.
 */

export type JobStatus = JobRow["status"];
export type ProgressUnit = JobRow["progress_unit"];

/** Interrupted runs (worker gone, heartbeat stale) after which a job fails instead of re-queueing. */
export const MAX_ATTEMPTS = 3;

export interface Job<P = unknown, R = unknown> {
  id: number;
  kind: string;
  groupId: number;
  siteId: number | null;
  payload: P;
  status: JobStatus;
  phase: string;
  progressDone: number;
  progressTotal: number;
  progressUnit: ProgressUnit;
  message: string | null;
  result: R | null;
  /** number of interrupted runs so far (see recoverStaleJobs) */
  attempts: number;
  lockedBy: string | null;
  heartbeatAt: Date | null;
  createdBy: string | null;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
}

export interface NewJob {
  kind: string;
  groupId: number;
  siteId?: number | null;
  payload?: unknown;
  createdBy?: string | null;
}

export interface Progress {
  phase: string;
  done: number;
  total: number;
  unit: ProgressUnit;
}

function toJob(r: JobRow): Job {
  return {
    id: Number(r.id),
    kind: r.kind,
    groupId: r.group_id,
    siteId: r.site_id,
    payload: jsonColumn(r.payload),
    status: r.status,
    phase: r.phase,
    progressDone: Number(r.progress_done),
    progressTotal: Number(r.progress_total),
    progressUnit: r.progress_unit,
    message: r.message,
    result: jsonColumn(r.result),
    attempts: r.attempts,
    lockedBy: r.locked_by,
    heartbeatAt: r.heartbeat_at,
    createdBy: r.created_by,
    createdAt: r.created_at,
    startedAt: r.started_at,
    finishedAt: r.finished_at,
  };
}

const now3 = () => db.raw("NOW(3)");

/**
 * Queues a job; pass `trx` to queue it atomically with the rows that ask for it
 * (an import row and its job land together or not at all).
 */
export async function enqueueJob(job: NewJob, trx?: Knex | Knex.Transaction): Promise<number> {
  const [id] = await (trx ?? db)("jobs").insert({
    kind: job.kind,
    group_id: job.groupId,
    site_id: job.siteId ?? null,
    payload: JSON.stringify(job.payload ?? {}),
    status: "queued",
    phase: "queued",
    created_by: job.createdBy ?? null,
  });
  if (id === undefined) throw new Error("enqueueJob: no id returned");
  return Number(id);
}

/** One job by id, or null. */
export async function getJob(id: number): Promise<Job | null> {
  const row = await db("jobs").where({ id }).first();
  return row ? toJob(row) : null;
}

/**
 * Takes the oldest queued job of one of `kinds` for `workerId` and marks it running, or returns
 * null when there is none. Exclusive across concurrent callers (row lock, SKIP LOCKED).
 * `onlyIds` narrows the choice to those jobs (a test running the job it made).
 */
export async function claimNextJob(
  workerId: string,
  kinds: readonly string[],
  onlyIds?: readonly number[],
): Promise<Job | null> {
  if (kinds.length === 0 || onlyIds?.length === 0) return null;
  const idFilter = onlyIds ? ` AND id IN (${onlyIds.map(() => "?").join(",")})` : "";
  return db.transaction(async (trx) => {
    const [rows] = (await trx.raw(
      `SELECT id FROM jobs WHERE status = 'queued' AND kind IN (${kinds.map(() => "?").join(",")})${idFilter}
        ORDER BY id LIMIT 1 FOR UPDATE SKIP LOCKED`,
      [...kinds, ...(onlyIds ?? [])],
    )) as [Array<{ id: number }>];
    const id = rows[0]?.id;
    if (id === undefined) return null;
    await trx("jobs")
      .where({ id })
      .update({
        status: "running",
        phase: "starting",
        locked_by: workerId,
        heartbeat_at: trx.raw("NOW(3)"),
        started_at: trx.raw("COALESCE(started_at, NOW(3))"),
        message: null,
      });
    const row = (await trx("jobs").where({ id }).first()) as JobRow;
    return toJob(row);
  });
}

/**
 * Proves `workerId` still runs job `id`. Returns false when the job is no longer its own
 * (cancelled, or re-queued after a stale heartbeat), so the worker can stop.
 */
export async function heartbeat(id: number, workerId: string): Promise<boolean> {
  const n = await db("jobs")
    .where({ id, status: "running", locked_by: workerId })
    .update({ heartbeat_at: now3() });
  return n > 0;
}

/** Records the phase and progress of a running job (and counts as a heartbeat). */
export async function reportProgress(id: number, p: Progress): Promise<void> {
  await db("jobs")
    .where({ id, status: "running" })
    .update({
      phase: p.phase.slice(0, 40),
      progress_done: Math.max(0, Math.round(p.done)),
      progress_total: Math.max(0, Math.round(p.total)),
      progress_unit: p.unit,
      heartbeat_at: now3(),
    });
}

type OwnerGuard = { workerId?: string };

function running(id: number, guard: OwnerGuard) {
  const q = db("jobs").where({ id, status: "running" });
  return guard.workerId === undefined ? q : q.andWhere({ locked_by: guard.workerId });
}

/**
 * Marks a running job done with its result. With `workerId`, only if that worker still owns it.
 * Returns whether the job was updated.
 */
export async function finishJob(id: number, result: unknown, guard: OwnerGuard = {}): Promise<boolean> {
  const n = await running(id, guard).update({
    status: "done",
    phase: "done",
    result: JSON.stringify(result ?? null),
    locked_by: null,
    finished_at: now3(),
  });
  return n > 0;
}

/** Marks a queued or running job failed with a message for people. Returns whether it was updated. */
export async function failJob(id: number, message: string, guard: OwnerGuard = {}): Promise<boolean> {
  const q = db("jobs").where({ id }).whereIn("status", ["queued", "running"]);
  if (guard.workerId !== undefined) q.andWhere({ locked_by: guard.workerId });
  const n = await q.update({
    status: "failed",
    phase: "failed",
    message,
    locked_by: null,
    finished_at: now3(),
  });
  return n > 0;
}

/** Cancels a queued or running job (a running handler notices at its next heartbeat). */
export async function cancelJob(id: number, message = "Cancelled."): Promise<boolean> {
  const n = await db("jobs")
    .where({ id })
    .whereIn("status", ["queued", "running"])
    .update({ status: "cancelled", phase: "cancelled", message, locked_by: null, finished_at: now3() });
  return n > 0;
}

/**
 * Running jobs whose heartbeat is older than `olderThanMs` (or missing) lost their worker:
 * each goes back to the queue with attempts+1, or fails once that reaches MAX_ATTEMPTS.
 * With `kinds`, only jobs of those kinds (a worker recovers what it can run). Returns the ids.
 */
export async function recoverStaleJobs(
  olderThanMs: number,
  kinds?: readonly string[],
): Promise<{ requeued: number[]; failed: number[] }> {
  if (kinds?.length === 0) return { requeued: [], failed: [] };
  return db.transaction(async (trx) => {
    const byKind = kinds ? `AND kind IN (${kinds.map(() => "?").join(",")})` : "";
    const [rows] = (await trx.raw(
      `SELECT id, attempts, phase FROM jobs
        WHERE status = 'running' ${byKind}
          AND (heartbeat_at IS NULL OR heartbeat_at < NOW(3) - INTERVAL ? MICROSECOND)
        ORDER BY id FOR UPDATE SKIP LOCKED`,
      [...(kinds ?? []), Math.max(0, Math.round(olderThanMs * 1000))],
    )) as [Array<{ id: number; attempts: number; phase: string }>];
    const requeued: number[] = [];
    const failed: number[] = [];
    for (const r of rows) {
      const attempts = r.attempts + 1;
      if (attempts >= MAX_ATTEMPTS) {
        await trx("jobs")
          .where({ id: r.id })
          .update({
            status: "failed",
            phase: "failed",
            attempts,
            locked_by: null,
            finished_at: trx.raw("NOW(3)"),
            message: `Stopped after ${attempts} interrupted attempts (the worker stopped while the job was in phase "${r.phase}").`,
          });
        failed.push(Number(r.id));
      } else {
        await trx("jobs")
          .where({ id: r.id })
          .update({
            status: "queued",
            phase: "queued",
            attempts,
            locked_by: null,
            heartbeat_at: null,
            progress_done: 0,
            message: `Re-queued after an interrupted attempt (${attempts} of ${MAX_ATTEMPTS}).`,
          });
        requeued.push(Number(r.id));
      }
    }
    return { requeued, failed };
  });
}
