import { hostname } from "node:os";
import { beforeAll, describe, expect, it } from "vitest";
import { db } from "@/lib/db/knex";
import {
  MAX_ATTEMPTS,
  cancelJob,
  claimNextJob,
  enqueueJob,
  failJob,
  finishJob,
  getJob,
  heartbeat,
  recoverStaleJobs,
  reportProgress,
} from "@/lib/jobs/queue";
import { releaseJobsOfDeadLocalWorkers } from "@/lib/jobs/worker";
import { createGroup, uniqueTag } from "@/tests/support/db";

let groupId: number;
beforeAll(async () => {
  groupId = (await createGroup()).id;
});

// Each test uses its own job kind, so test files running in parallel never see each other's jobs.
const kind = () => `t-${uniqueTag()}`;

async function makeStale(id: number) {
  await db("jobs").where({ id }).update({ heartbeat_at: db.raw("NOW(3) - INTERVAL 1 HOUR") });
}

describe("job queue", () => {
  it("queues a job with its payload and reads it back", async () => {
    const k = kind();
    const id = await enqueueJob({ kind: k, groupId, payload: { importId: 7, note: "é" }, createdBy: null });
    const job = await getJob(id);
    expect(job).toMatchObject({ id, kind: k, groupId, siteId: null, status: "queued", attempts: 0 });
    expect(job?.payload).toEqual({ importId: 7, note: "é" });
    expect(await getJob(id + 1_000_000)).toBeNull();
  });

  it("enqueues inside a caller's transaction and rolls back with it", async () => {
    const k = kind();
    await expect(
      db.transaction(async (trx) => {
        await enqueueJob({ kind: k, groupId }, trx);
        throw new Error("abort");
      }),
    ).rejects.toThrow("abort");
    expect(await db("jobs").where({ kind: k }).count({ n: "*" }).first()).toEqual({ n: 0 });
  });

  it("gives each job to exactly one of two concurrent claimers, oldest first", async () => {
    const k = kind();
    const ids: number[] = [];
    for (let i = 0; i < 24; i++) ids.push(await enqueueJob({ kind: k, groupId, payload: { i } }));
    const claimed: Record<string, number[]> = { a: [], b: [] };
    async function claimer(name: "a" | "b") {
      for (;;) {
        const job = await claimNextJob(`worker-${name}`, [k]);
        if (!job) return;
        expect(job.status).toBe("running");
        expect(job.lockedBy).toBe(`worker-${name}`);
        claimed[name]!.push(job.id);
      }
    }
    await Promise.all([claimer("a"), claimer("b"), claimer("a"), claimer("b")]);
    const all = [...claimed.a!, ...claimed.b!];
    expect(all.sort((x, y) => x - y)).toEqual(ids);
    expect(new Set(all).size).toBe(ids.length);
    const rows = await db("jobs").where({ kind: k }).select("status", "locked_by");
    expect(rows.every((r: { status: string }) => r.status === "running")).toBe(true);
  });

  it("claims only the named jobs when asked to, skipping older ones of the same kind", async () => {
    const k = kind();
    const older = await enqueueJob({ kind: k, groupId });
    const mine = await enqueueJob({ kind: k, groupId });
    expect(await claimNextJob("w", [k], [])).toBeNull();
    expect((await claimNextJob("w", [k], [mine]))?.id).toBe(mine);
    expect(await claimNextJob("w", [k], [mine])).toBeNull();
    expect((await claimNextJob("w", [k]))?.id).toBe(older);
  });

  it("claims only the kinds asked for and never a running or finished job", async () => {
    const k1 = kind();
    const k2 = kind();
    const a = await enqueueJob({ kind: k1, groupId });
    expect(await claimNextJob("w", [k2])).toBeNull();
    expect(await claimNextJob("w", [])).toBeNull();
    expect((await claimNextJob("w", [k1, k2]))?.id).toBe(a);
    expect(await claimNextJob("w", [k1])).toBeNull();
    expect(await finishJob(a, { rows: 3 })).toBe(true);
    expect(await claimNextJob("w", [k1])).toBeNull();
    const done = await getJob(a);
    expect(done).toMatchObject({ status: "done", phase: "done", result: { rows: 3 }, lockedBy: null });
    expect(done?.finishedAt).toBeInstanceOf(Date);
  });

  it("records progress and heartbeats only for the owning worker", async () => {
    const k = kind();
    const id = await enqueueJob({ kind: k, groupId });
    await claimNextJob("owner", [k]);
    await reportProgress(id, { phase: "parsing", done: 500, total: 2000, unit: "bytes" });
    expect(await getJob(id)).toMatchObject({ phase: "parsing", progressDone: 500, progressTotal: 2000, progressUnit: "bytes" });
    expect(await heartbeat(id, "owner")).toBe(true);
    expect(await heartbeat(id, "someone-else")).toBe(false);
    expect(await finishJob(id, null, { workerId: "someone-else" })).toBe(false);
    expect(await failJob(id, "bad file", { workerId: "owner" })).toBe(true);
    expect(await getJob(id)).toMatchObject({ status: "failed", message: "bad file" });
    expect(await heartbeat(id, "owner")).toBe(false);
  });

  it("cancels a running job so its heartbeat no longer holds", async () => {
    const k = kind();
    const id = await enqueueJob({ kind: k, groupId });
    await claimNextJob("owner", [k]);
    expect(await cancelJob(id)).toBe(true);
    expect(await heartbeat(id, "owner")).toBe(false);
    expect(await cancelJob(id)).toBe(false);
    expect((await getJob(id))?.status).toBe("cancelled");
  });

  it("re-queues a running job with a stale heartbeat (attempts+1) and leaves live ones alone", async () => {
    const k = kind();
    const stale = await enqueueJob({ kind: k, groupId });
    const live = await enqueueJob({ kind: k, groupId });
    await claimNextJob("gone", [k]);
    await claimNextJob("alive", [k]);
    await makeStale(stale);
    const out = await recoverStaleJobs(60_000, [k]);
    expect(out.requeued).toContain(stale);
    expect(out.requeued).not.toContain(live);
    expect(await getJob(stale)).toMatchObject({ status: "queued", attempts: 1, lockedBy: null });
    expect((await getJob(live))?.status).toBe("running");
    // queued again, so another worker can take it
    expect((await claimNextJob("next", [k]))?.id).toBe(stale);
  });

  it(`fails a job after ${MAX_ATTEMPTS} interrupted attempts instead of running it forever`, async () => {
    const k = kind();
    const id = await enqueueJob({ kind: k, groupId });
    for (let i = 1; i <= MAX_ATTEMPTS; i++) {
      expect((await claimNextJob("w", [k]))?.id).toBe(id);
      await reportProgress(id, { phase: "writing", done: 1, total: 2, unit: "rows" });
      await makeStale(id);
      const out = await recoverStaleJobs(60_000, [k]);
      if (i < MAX_ATTEMPTS) expect(out.requeued).toContain(id);
      else expect(out.failed).toContain(id);
    }
    const job = await getJob(id);
    expect(job).toMatchObject({ status: "failed", attempts: MAX_ATTEMPTS });
    expect(job?.message).toMatch(/interrupted attempts.*"writing"/);
    expect(await claimNextJob("w", [k])).toBeNull();
  });

  it("treats a job locked by a dead worker process of this host as orphaned at once", async () => {
    const k = kind();
    const id = await enqueueJob({ kind: k, groupId });
    await claimNextJob("x", [k]);
    // pid 2^22+1 is above Linux's pid_max default ceiling, so no process has it
    await db("jobs").where({ id }).update({ locked_by: `${hostname().slice(0, 40)}:4194305:abc` });
    expect(await releaseJobsOfDeadLocalWorkers([k])).toBeGreaterThanOrEqual(1);
    expect((await getJob(id))?.heartbeatAt).toBeNull();
    expect((await recoverStaleJobs(3_600_000, [k])).requeued).toContain(id);
  });
});
