/*
 * The background worker: runs queued jobs (imports, recomputes, reclassifications, ...) beside
 * the web server. `npm start` and `npm run dev` launch it; `npm run worker` runs it alone.
 *
 * Composition root, like app/: each feature exports its handlers by job kind from
 * features/<name>/server/jobs.ts; registering a feature is one line in HANDLERS.
 */
import type { JobHandler } from "@/lib/jobs/worker";
import { newWorkerId, runWorker } from "@/lib/jobs/worker";
import { closeDb } from "@/lib/db/knex";
import { describeDatabaseError, isDatabaseUnavailable } from "@/lib/db/errors";
import { importJobHandlers } from "@/features/imports/server/jobs";
import { rulesJobHandlers } from "@/features/rules/server/jobs";
import { anomalyJobHandlers } from "@/features/anomalies/server/jobs";
import { runOutbox } from "@/lib/mail/outbox";
import { runNoticeSchedule } from "@/features/notices/server/schedule";

const HANDLERS: Readonly<Record<string, JobHandler>> = {
  ...importJobHandlers,
  ...rulesJobHandlers,
  ...anomalyJobHandlers,
};

/** Loops that run beside the job queue until the stop signal: mail delivery, notice producers. */
const LOOPS: ReadonlyArray<(opts: { signal: AbortSignal }) => Promise<void>> = [runOutbox, runNoticeSchedule];

/** After a stop signal the current job gets this long to finish; an interrupted job is re-queued at the next start. */
const GRACE_MS = 15_000;

const log = (msg: string) => console.log(`[worker] ${msg}`);

async function main(): Promise<void> {
  const stop = new AbortController();
  let firstSignalAt = 0;
  const onSignal = (sig: NodeJS.Signals) => {
    // Ctrl-C reaches us both from the terminal and through npm start: one stop, not two.
    if (stop.signal.aborted && Date.now() - firstSignalAt < 2000) return;
    firstSignalAt ||= Date.now();
    if (stop.signal.aborted) {
      log(`${sig} again: stopping now`);
      process.exit(1);
    }
    log(`${sig}: finishing the current job (at most ${GRACE_MS / 1000} s)`);
    stop.abort();
    setTimeout(() => {
      log("grace period over; the unfinished job will be re-queued at the next start");
      process.exit(0);
    }, GRACE_MS).unref();
  };
  process.on("SIGINT", onSignal);
  process.on("SIGTERM", onSignal);
  // A query left unawaited while the database is away must not end the worker; anything else still does.
  process.on("unhandledRejection", (reason) => {
    if (isDatabaseUnavailable(reason)) {
      log(`database unavailable in the background (${describeDatabaseError(reason)}); carrying on`);
      return;
    }
    console.error("[worker] unhandled rejection", reason);
    process.exit(1);
  });

  await Promise.all([
    runWorker({ handlers: HANDLERS, workerId: newWorkerId(), signal: stop.signal, log }),
    ...LOOPS.map((loop) => loop({ signal: stop.signal })),
  ]);
  await closeDb();
}

main().catch((err: unknown) => {
  console.error(`[worker] ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`);
  process.exit(1);
});
