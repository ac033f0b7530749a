import "server-only";
import { queueImportNotices } from "@/features/notices/server/import-notices";
import { queueWeeklyDigests } from "@/features/notices/server/digest";
import { describeDatabaseError } from "@/lib/db/errors";

/** One round of the notice producers (the worker's loop and tests call it). */
export async function queueNotices(
  now: Date = new Date(),
): Promise<{ importNotices: number; digests: number }> {
  const importNotices = await queueImportNotices(now);
  const digests = await queueWeeklyDigests(now);
  return { importNotices, digests };
}

type ScheduleOptions = {
  signal: AbortSignal;
  pollMs?: number;
  /** One round; queueNotices unless a test stands in for it. */
  round?: () => Promise<unknown>;
  log?: (...args: unknown[]) => void;
};

/**
 * The worker's notice loop: every `pollMs` until `signal` aborts; a failed round is logged and
 * retried next round. While the database is away every round fails, so each failed round
 * gets one line with the error's message, only the first of a run of failures also the full
 * error (its stack), and the first round that succeeds again says so.
 */
export async function runNoticeSchedule({
  signal,
  pollMs = 15_000,
  round = queueNotices,
  log = console.error,
}: ScheduleOptions): Promise<void> {
  let failures = 0;
  while (!signal.aborted) {
    try {
      await round();
      if (failures > 0) log(`[notices] recovered after ${failures} failed round(s)`);
      failures = 0;
    } catch (err) {
      failures++;
      const line = `[notices] round failed: ${describeDatabaseError(err)}`;
      if (failures === 1) log(line, err);
      else log(`${line} (${failures} in a row)`);
    }
    await new Promise<void>((resolve) => {
      const t = setTimeout(finish, pollMs);
      function finish() {
        clearTimeout(t);
        signal.removeEventListener("abort", finish);
        resolve();
      }
      signal.addEventListener("abort", finish, { once: true });
    });
  }
}
