import "server-only";
import { queueImportNotices } from "@/features/notices/server/import-notices";
import { queueWeeklyDigests } from "@/features/notices/server/digest";

/** One round of the notice producers (the worker's loop and tests call it). */
export async function queueNotices(now: Date = new Date()): Promise<{ importNotices: number; digests: number }> {
  const importNotices = await queueImportNotices(now);
  const digests = await queueWeeklyDigests(now);
  return { importNotices, digests };
}

/** The worker's notice loop: every `pollMs` until `signal` aborts; failures are logged and retried next round. */
export async function runNoticeSchedule({ signal, pollMs = 15_000 }: { signal: AbortSignal; pollMs?: number }): Promise<void> {
  while (!signal.aborted) {
    try {
      await queueNotices();
    } catch (err) {
      console.error("[notices] round failed", err);
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
