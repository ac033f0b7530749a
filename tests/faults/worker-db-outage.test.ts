/*
 * The worker process (scripts/worker.ts) while its database goes away and comes back: it must
 * keep running (its loops log, back off and retry instead of crashing), and deliver work queued
 * after the restart without being restarted itself. Runs against a MariaDB of this file's own.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { RunningCatcher } from "@/lib/mail/catcher";
import type { queueMail as QueueMail } from "@/lib/mail/outbox";
import { startPrivateDb, type PrivateDb } from "@/tests/faults/private-db";

let server: PrivateDb;
let catcher: RunningCatcher;
let mailDir = "";
let worker: ChildProcess;
let output = "";
let queueMail: typeof QueueMail;
let closeDb: () => Promise<void>;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function until(what: string, check: () => boolean | Promise<boolean>, limitMs = 90_000): Promise<void> {
  const deadline = Date.now() + limitMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`gave up waiting for ${what}; worker output:\n${output}`);
    await sleep(200);
  }
}

const caughtSubjects = (): string[] => {
  try {
    return readFileSync(path.join(mailDir, "index.jsonl"), "utf8")
      .split("\n")
      .filter(Boolean)
      .map((l) => (JSON.parse(l) as { subject: string }).subject);
  } catch {
    return [];
  }
};

beforeAll(async () => {
  server = await startPrivateDb();
  process.env.DATABASE_URL = server.url;
  ({ queueMail } = await import("@/lib/mail/outbox"));
  ({ closeDb } = await import("@/lib/db/knex"));
  const { startMailCatcher } = await import("@/lib/mail/catcher");
  mailDir = mkdtempSync(path.join(tmpdir(), "gloaming-worker-outage-"));
  catcher = await startMailCatcher({ dir: mailDir, port: 0 });
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    DATABASE_URL: server.url,
    MAIL_CATCHER_PORT: String(catcher.port),
  };
  delete env.SMTP_HOST;
  delete env.SMTP_PORT;
  worker = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", "scripts/worker.ts"], {
    cwd: process.cwd(),
    env,
    stdio: ["ignore", "pipe", "pipe"],
  });
  worker.stdout?.on("data", (d: Buffer) => (output += d.toString()));
  worker.stderr?.on("data", (d: Buffer) => (output += d.toString()));
}, 180_000);

afterAll(async () => {
  if (worker?.exitCode === null) worker.kill("SIGKILL");
  await closeDb?.().catch(() => undefined);
  await catcher?.close();
  await server?.destroy();
  if (mailDir) rmSync(mailDir, { recursive: true, force: true });
});

/** Queues a mail, retrying while the test's own pool still holds connections the restart killed. */
async function queue(subject: string): Promise<void> {
  for (let i = 0; ; i++) {
    try {
      await queueMail({ kind: "fault_test", to: "worker-outage@example.test", subject, text: "Synthetic." });
      return;
    } catch (err) {
      if (i >= 20) throw err;
      await sleep(250);
    }
  }
}

describe("worker while the database restarts", () => {
  test("keeps running through the outage and delivers mail queued after the restart", async () => {
    await queue("before the outage");
    await until("the first mail", () => caughtSubjects().includes("before the outage"));
    const pid = worker.pid;

    await server.stop();
    const unavailableLines = () => output.split("\n").filter((l) => /database unavailable/.test(l)).length;
    // Both the job loop and the outbox loop notice, back off and try again (at least two rounds each).
    await until("the worker to notice the outage", () => unavailableLines() >= 4);
    expect(worker.exitCode).toBeNull();
    expect(worker.signalCode).toBeNull();

    await server.start();
    await queue("after the restart");
    await until(
      "the mail queued after the restart",
      () => caughtSubjects().includes("after the restart"),
      120_000,
    );
    expect(worker.exitCode).toBeNull();
    expect(worker.pid).toBe(pid);
    expect(caughtSubjects().filter((s) => s === "before the outage")).toHaveLength(1);
    expect(caughtSubjects().filter((s) => s === "after the restart")).toHaveLength(1);

    const lines = output.split("\n");
    const retries = lines.filter((l) => /retrying in \d+(\.\d+)? s/.test(l));
    console.log(
      `[faults] worker: stayed up (pid ${pid}) through a database stop and start; ${unavailableLines()} "database unavailable" lines, ` +
        `pauses ${[...new Set(retries.map((l) => /retrying in (\S+) s/.exec(l)?.[1]))].join(", ")} s; mail before and after delivered once each`,
    );

    const exited = new Promise((r) => worker.once("exit", r));
    worker.kill("SIGTERM");
    await exited;
    expect(worker.exitCode).toBe(0);
  }, 300_000);
});
