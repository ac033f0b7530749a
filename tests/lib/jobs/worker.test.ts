import { beforeAll, describe, expect, it } from "vitest";
import { enqueueJob, getJob } from "@/lib/jobs/queue";
import { runOnce, runWorker, type JobHandler } from "@/lib/jobs/worker";
import { createGroup, uniqueTag } from "@/tests/support/db";

let groupId: number;
beforeAll(async () => {
  groupId = (await createGroup()).id;
});

const kind = () => `t-${uniqueTag()}`;

describe("worker", () => {
  it("returns null when nothing is queued", async () => {
    expect(await runOnce({ handlers: { [kind()]: async () => null } })).toBeNull();
  });

  it("runs a handler, stores its progress and result", async () => {
    const k = kind();
    const id = await enqueueJob({ kind: k, groupId, payload: { n: 3 } });
    const handler: JobHandler = async (job, ctx) => {
      const { n } = job.payload as { n: number };
      await ctx.progress({ phase: "counting", done: n, total: n, unit: "rows" });
      return { counted: n };
    };
    expect(await runOnce({ handlers: { [k]: handler }, workerId: "w1" })).toEqual({ jobId: id, kind: k, status: "done" });
    expect(await getJob(id)).toMatchObject({
      status: "done",
      result: { counted: 3 },
      progressDone: 3,
      progressTotal: 3,
      lockedBy: null,
    });
  });

  it("fails the job with the handler's error message", async () => {
    const k = kind();
    const id = await enqueueJob({ kind: k, groupId });
    const out = await runOnce({
      handlers: {
        [k]: async () => {
          throw new Error("The file has no timestamp column.");
        },
      },
    });
    expect(out).toMatchObject({ jobId: id, status: "failed" });
    expect(await getJob(id)).toMatchObject({ status: "failed", message: "The file has no timestamp column." });
  });

  it("aborts the handler's signal when the job is cancelled while running", async () => {
    const k = kind();
    const id = await enqueueJob({ kind: k, groupId });
    const { cancelJob } = await import("@/lib/jobs/queue");
    const handler: JobHandler = (_job, ctx) =>
      new Promise((_resolve, reject) => {
        void cancelJob(id);
        ctx.signal.addEventListener("abort", () => reject(new Error("stopped")), { once: true });
      });
    const out = await runOnce({ handlers: { [k]: handler }, heartbeatMs: 20 });
    expect(out).toMatchObject({ jobId: id, status: "cancelled" });
    expect((await getJob(id))?.status).toBe("cancelled");
  });

  it("runWorker processes queued jobs until its signal aborts", async () => {
    const k = kind();
    const ids = [await enqueueJob({ kind: k, groupId }), await enqueueJob({ kind: k, groupId })];
    const stop = new AbortController();
    const seen: number[] = [];
    const loop = runWorker({
      handlers: {
        [k]: async (job) => {
          seen.push(job.id);
          if (seen.length === ids.length) stop.abort();
          return { ok: true };
        },
      },
      pollMs: 20,
      signal: stop.signal,
    });
    await loop;
    expect(seen).toEqual(ids);
    for (const id of ids) expect((await getJob(id))?.status).toBe("done");
  });
});
