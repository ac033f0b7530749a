/*
 * The worker killed (SIGKILL) while an import's rows are being written, then started again:
 * the transaction is rolled back by the server, so no partial rows stay; the restarted worker
 * re-queues the interrupted job and completes it, or fails it after MAX_ATTEMPTS interruptions.
 * The worker is a real child process (tests/faults/import-worker.ts). Data is SYNTHETIC.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { once } from "node:events";
import { Readable } from "node:stream";
import { afterEach, describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { enqueueJob, getJob, MAX_ATTEMPTS, type Job } from "@/lib/jobs/queue";
import { putObject } from "@/lib/storage/storage";
import { getImport } from "@/features/imports/server/queries";
import { startImport } from "@/features/imports/server/mutations";
import { siteForCaller } from "@/features/imports/server/access";
import { analystWithSite, eveningCount, halfHourCount, syntheticCsv } from "@/tests/features/imports/helpers";

/** Five years of half-hours: long enough that the write is seen in progress. */
const DAYS = 5 * 365;
const CONTENT = syntheticCsv(DAYS, {
  startDate: "2012-01-01",
  seed: 71,
  columns: ["WS", "WD", "USTAR", "W_SIGMA", "H", "LE", "TA", "PA", "RH"],
});

const children = new Set<ChildProcess>();
afterEach(async () => {
  for (const c of children) {
    if (c.exitCode === null && c.signalCode === null) {
      c.kill("SIGKILL");
      await once(c, "exit");
    }
  }
  children.clear();
});

/** Starts a worker process that claims only jobs of `kind`. */
function startWorker(kind: string, log: string[]): ChildProcess {
  const child = spawn(
    process.execPath,
    ["--conditions=react-server", "--import", "tsx", "tests/faults/import-worker.ts", kind],
    {
      env: process.env,
      stdio: ["ignore", "pipe", "pipe"],
    },
  );
  child.stdout?.on("data", (b: Buffer) => log.push(b.toString()));
  child.stderr?.on("data", (b: Buffer) => log.push(b.toString()));
  children.add(child);
  return child;
}

async function until<T>(
  what: string,
  probe: () => Promise<T | null | undefined | false>,
  log: string[],
  timeoutMs = 120_000,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await probe();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}\n${log.join("")}`);
    await new Promise((r) => setTimeout(r, 15));
  }
}

/** Rows of the import visible to a dirty read: written by the open transaction, not committed. */
async function uncommittedRows(importId: number): Promise<number> {
  return db.transaction(
    async (trx) => {
      const [rows] = (await trx.raw("SELECT COUNT(*) AS n FROM half_hours WHERE import_id = ?", [
        importId,
      ])) as [Array<{ n: number | string }>];
      return Number(rows[0]?.n ?? 0);
    },
    { isolationLevel: "read uncommitted" },
  );
}

/**
 * An import of CONTENT queued as a job of its own kind (the import row and job as startImport
 * makes them), so that only this file's worker process runs it.
 */
async function queueOwnImport(): Promise<{ siteId: number; importId: number; jobId: number; kind: string }> {
  const { site, userId, groupId } = await analystWithSite();
  const kind = `import-fault-${randomBytes(4).toString("hex")}`;
  const stored = await putObject(Readable.from([Buffer.from(CONTENT)]));
  return db.transaction(async (trx) => {
    const [id] = await trx("imports").insert({
      site_id: site.id,
      sha256: stored.sha256,
      original_name: "five-years.csv",
      size_bytes: stored.size,
      storage_key: stored.key,
      options: "{}",
      status: "queued",
      created_by: userId,
    });
    const importId = Number(id);
    const jobId = await enqueueJob(
      { kind, groupId, siteId: site.id, payload: { importId }, createdBy: userId },
      trx,
    );
    await trx("imports").where({ id: importId }).update({ job_id: jobId });
    return { siteId: site.id, importId, jobId, kind };
  });
}

/**
 * Waits until the worker is writing the import's rows (some are in the open transaction), freezes
 * it there (SIGSTOP, so the state checked is the state killed), checks the rows are partial and
 * uncommitted, then kills it and waits for the server to roll the transaction back.
 */
async function killMidWrite(
  child: ChildProcess,
  importId: number,
  siteId: number,
  log: string[],
): Promise<number> {
  await until("rows being written", async () => (await uncommittedRows(importId)) > 0, log);
  child.kill("SIGSTOP");
  const partial = await uncommittedRows(importId);
  expect(partial).toBeGreaterThan(0);
  // Usually a part of the file; all of it only if the freeze fell between the last row and the commit.
  expect(partial).toBeLessThanOrEqual(DAYS * 48);
  // Nothing of it is committed: a normal read sees none of the rows.
  expect(await halfHourCount(siteId)).toBe(0);
  child.kill("SIGKILL");
  await once(child, "exit");
  // The server notices the closed connection and rolls the transaction back.
  await until("the rollback", async () => (await uncommittedRows(importId)) === 0, log);
  return partial;
}

describe("the worker killed while an import writes", () => {
  test(
    "leaves no partial rows; started again, it re-queues the job and completes it",
    { timeout: 300_000 },
    async () => {
      const log: string[] = [];
      const { siteId, importId, jobId, kind } = await queueOwnImport();
      const first = startWorker(kind, log);
      await killMidWrite(first, importId, siteId, log);
      expect(await halfHourCount(siteId)).toBe(0);
      const orphan = (await getJob(jobId)) as Job;
      expect(orphan.status).toBe("running");
      expect(orphan.lockedBy).toContain(`:${first.pid}:`);

      startWorker(kind, log);
      const done = await until(
        "the job to end",
        async () => {
          const j = await getJob(jobId);
          return j && j.status !== "queued" && j.status !== "running" ? j : null;
        },
        log,
        240_000,
      );
      expect(done.status).toBe("done");
      expect(done.attempts).toBe(1);
      expect(done.result).toMatchObject({ outcome: "landed", rows: DAYS * 48 });
      expect(await halfHourCount(siteId)).toBe(DAYS * 48);
      const owners = await db("half_hours").where({ site_id: siteId }).distinct("import_id");
      expect(owners).toEqual([{ import_id: importId }]);
      expect((await getImport(siteId, importId))?.status).toBe("landed");
      expect(await eveningCount(siteId)).toBeGreaterThan(DAYS - 2);
    },
  );

  test(
    `killed ${MAX_ATTEMPTS} times, the job is failed with a clear message and the file may be sent again`,
    { timeout: 300_000 },
    async () => {
      const log: string[] = [];
      const { siteId, importId, jobId, kind } = await queueOwnImport();
      for (let attempt = 0; attempt < MAX_ATTEMPTS; attempt++) {
        const worker = startWorker(kind, log);
        await killMidWrite(worker, importId, siteId, log);
        expect(await halfHourCount(siteId)).toBe(0);
      }
      const last = startWorker(kind, log);
      const failed = await until(
        "the job to fail",
        async () => {
          const j = await getJob(jobId);
          return j && j.status === "failed" ? j : null;
        },
        log,
      );
      expect(failed.attempts).toBe(MAX_ATTEMPTS);
      expect(failed.message).toMatch(
        new RegExp(
          `^Stopped after ${MAX_ATTEMPTS} interrupted attempts \\(the worker stopped while the job was in phase "writing"\\)\\.$`,
        ),
      );
      last.kill("SIGTERM");
      await once(last, "exit");
      expect(await halfHourCount(siteId)).toBe(0);
      // The history shows it failed, not "running" for ever, and the same bytes may be imported again.
      expect((await getImport(siteId, importId))?.status).toBe("failed");
      const row = (await db("imports").where({ id: importId }).first()) as {
        site_id: number;
        sha256: string;
        size_bytes: number;
        storage_key: string;
        created_by: string;
      };
      const { site } = await siteForCaller({ userId: row.created_by }, siteId, "analyst");
      const again = await startImport({
        site,
        userId: row.created_by,
        stored: { sha256: row.sha256, size: Number(row.size_bytes), key: row.storage_key },
        filename: "five-years.csv",
        settings: {},
      });
      expect(again).toMatchObject({ kind: "queued", importId });
      // Leave the new job to nobody: this test is about the failed one.
      await db("jobs")
        .where({ id: (again as { jobId: number }).jobId })
        .update({ status: "cancelled", phase: "cancelled" });
    },
  );
});
