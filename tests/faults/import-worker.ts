/*
 * A worker process for the import crash test (tests/faults/import-crash.test.ts): the real worker
 * loop with the real import handler, claiming only jobs of the kind given as its argument, so it
 * never takes another test file's jobs. Started with `node --conditions=react-server --import tsx`.
 */
import { closeDb } from "@/lib/db/knex";
import { newWorkerId, runWorker } from "@/lib/jobs/worker";
import { importJobHandlers } from "@/features/imports/server/jobs";
import { IMPORT_JOB } from "@/features/imports/server/mutations";

const kind = process.argv[2];
const handler = importJobHandlers[IMPORT_JOB];
if (!kind || !handler) throw new Error("usage: import-worker.ts <job kind>");

const stop = new AbortController();
process.on("SIGTERM", () => stop.abort());
await runWorker({
  handlers: { [kind]: handler },
  workerId: newWorkerId(),
  pollMs: 100,
  heartbeatMs: 1000,
  signal: stop.signal,
  log: (m) => console.log(`[fault-worker ${process.pid}] ${m}`),
});
await closeDb();
