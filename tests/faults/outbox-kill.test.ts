/*
 * The mail worker killed (SIGKILL) at every point of sending: after claiming a row but before
 * SMTP, in the middle of DATA, and after the server's "250" but before the row is marked sent.
 * A delivery round runs in a child process (tests/faults/outbox-deliver.ts) talking to a catcher
 * of this file's own through a loopback proxy that kills the child at the chosen point. After
 * each kill the round is started again (short lease); every row must end up stored exactly once.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { createServer, connect, type Server, type Socket } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import type { MailOutboxRow } from "@/lib/db/tables";
import { startMailCatcher, type CaughtMessage, type RunningCatcher } from "@/lib/mail/catcher";
import { queueMail } from "@/lib/mail/outbox";
import { uniqueEmail } from "@/tests/support/db";

type KillPoint = "connect" | "data" | "accepted";

const LEASE_MS = 1500;

let catcher: RunningCatcher;
let proxy: Server;
let proxyPort = 0;
let mailDir = "";
/** Where the proxy kills the current child; null lets the conversation through. */
let killAt: KillPoint | null = null;
let child: ChildProcess | null = null;
let kills = 0;

function killChild(client: Socket, upstream?: Socket) {
  if (child?.exitCode === null && child.signalCode === null) {
    child.kill("SIGKILL");
    kills++;
  }
  killAt = null;
  client.destroy();
  upstream?.destroy();
}

/** Forwards SMTP between the child and the catcher, watching the conversation for the kill point. */
function handle(client: Socket) {
  if (killAt === "connect") return killChild(client);
  const upstream = connect(catcher.port, "127.0.0.1");
  let commands = "";
  let sentData = false;
  let inBody = false;
  let tail = "";
  let bodyEnded = false;
  client.on("data", (chunk: Buffer) => {
    if (inBody && killAt === "data") {
      upstream.write(chunk.subarray(0, Math.max(1, chunk.length >> 1)), () => killChild(client, upstream));
      return;
    }
    upstream.write(chunk);
    const text = chunk.toString("latin1");
    if (!inBody) {
      commands += text;
      if (/(^|\r\n)DATA\r\n/.test(commands)) sentData = true;
    } else {
      tail = (tail + text).slice(-5);
      if (tail.endsWith("\r\n.\r\n")) bodyEnded = true;
    }
  });
  upstream.on("data", (chunk: Buffer) => {
    const text = chunk.toString("latin1");
    if (sentData && !inBody && /(^|\n)354[ -]/.test(text)) inBody = true;
    if (bodyEnded && killAt === "accepted" && /(^|\n)250[ -]/.test(text)) {
      // The catcher has stored the message; the sender never hears so.
      killChild(client, upstream);
      return;
    }
    client.write(chunk);
  });
  client.on("error", () => upstream.destroy());
  upstream.on("error", () => client.destroy());
  client.on("close", () => upstream.destroy());
  upstream.on("close", () => client.destroy());
}

beforeAll(async () => {
  mailDir = mkdtempSync(path.join(tmpdir(), "gloaming-outbox-kill-"));
  catcher = await startMailCatcher({ dir: mailDir, port: 0 });
  proxy = createServer(handle);
  await new Promise<void>((resolve) => proxy.listen(0, "127.0.0.1", resolve));
  const addr = proxy.address();
  proxyPort = typeof addr === "object" && addr ? addr.port : 0;
});

afterAll(async () => {
  await new Promise<void>((resolve) => proxy.close(() => resolve()));
  await catcher.close();
  rmSync(mailDir, { recursive: true, force: true });
});

type RunResult = { code: number | null; signal: NodeJS.Signals | null; out: string };

/** One delivery round for `ids` in a child process, killed at `point` when given. */
function deliverInChild(ids: number[], point: KillPoint | null): Promise<RunResult> {
  killAt = point;
  const env: NodeJS.ProcessEnv = { ...process.env, MAIL_CATCHER_PORT: String(proxyPort) };
  delete env.SMTP_HOST;
  delete env.SMTP_PORT;
  const c = spawn(
    process.execPath,
    [
      "--conditions=react-server",
      "--import",
      "tsx",
      "tests/faults/outbox-deliver.ts",
      ids.join(","),
      String(LEASE_MS),
    ],
    { cwd: process.cwd(), env, stdio: ["ignore", "pipe", "pipe"] },
  );
  child = c;
  let out = "";
  c.stdout.on("data", (d: Buffer) => (out += d.toString()));
  c.stderr.on("data", (d: Buffer) => (out += d.toString()));
  return new Promise((resolve) => c.on("exit", (code, signal) => resolve({ code, signal, out })));
}

const rowsOf = (ids: number[]): Promise<MailOutboxRow[]> =>
  db("mail_outbox").whereIn("id", ids).orderBy("id");

/** Waits until the leases of `ids` have run out, so the next round may claim them again. */
async function leaseOver(ids: number[]): Promise<void> {
  for (const row of await rowsOf(ids)) {
    if (row.status !== "sending" || !row.lease_until) continue;
    const wait = new Date(row.lease_until).getTime() - Date.now() + 50;
    if (wait > 0) await new Promise((r) => setTimeout(r, wait));
  }
}

function caught(): CaughtMessage[] {
  try {
    return readFileSync(path.join(mailDir, "index.jsonl"), "utf8")
      .split("\n")
      .filter(Boolean)
      .map((l) => JSON.parse(l) as CaughtMessage);
  } catch {
    return [];
  }
}

function repeats(): Array<{ messageId: string }> {
  try {
    return readFileSync(path.join(mailDir, "repeats.jsonl"), "utf8")
      .split("\n")
      .filter(Boolean)
      .map((l) => JSON.parse(l) as { messageId: string });
  } catch {
    return [];
  }
}

async function queue(n: number): Promise<number[]> {
  const ids: number[] = [];
  for (let i = 0; i < n; i++) {
    const id = await queueMail({
      kind: "fault_test",
      to: uniqueEmail("outbox-kill"),
      subject: `Synthetic kill-test message ${i}`,
      text: `Body of synthetic message ${i}.\n`.repeat(200),
    });
    if (id === null) throw new Error("not queued");
    ids.push(id);
  }
  return ids;
}

/** Kills a round at each point in turn, checks nothing was lost, then lets one round finish. */
async function killThenFinish(ids: number[], points: KillPoint[]): Promise<void> {
  for (const point of points) {
    const before = kills;
    const r = await deliverInChild(ids, point);
    expect(r.signal, `${point}: ${r.out}`).toBe("SIGKILL");
    expect(kills).toBe(before + 1);
    // Killed mid-round: the first row is leased, not sent, not lost.
    const [first] = await rowsOf(ids);
    expect(first?.status).toBe("sending");
    await leaseOver(ids);
  }
  const done = await deliverInChild(ids, null);
  expect(done.code, done.out).toBe(0);
  const finished = await rowsOf(ids);
  expect(finished).toHaveLength(ids.length);
  for (const row of finished) expect(row.status, `row ${row.id}`).toBe("sent");
}

describe("worker killed while sending mail", () => {
  test("every row is stored once however often the sender is killed, at any point", async () => {
    const scenarios: Array<{ ids: number[]; points: KillPoint[] }> = [
      { ids: await queue(1), points: ["connect", "connect"] },
      { ids: await queue(1), points: ["data", "data"] },
      { ids: await queue(1), points: ["accepted", "accepted"] },
      { ids: await queue(1), points: ["connect", "data", "accepted"] },
      // Three rows claimed in one round; the sender dies on the first one.
      { ids: await queue(3), points: ["accepted", "data"] },
    ];
    for (const s of scenarios) await killThenFinish(s.ids, s.points);

    const allIds = scenarios.flatMap((s) => s.ids);
    const rows = await rowsOf(allIds);
    expect(rows).toHaveLength(7);
    const stored = caught();
    const dropped = repeats();
    let acceptedOverSmtp = 0;
    for (const row of rows) {
      expect(row.message_id).toBeTruthy();
      const copies = stored.filter((m) => m.messageId === row.message_id);
      expect(copies, `row ${row.id}`).toHaveLength(1);
      expect(copies[0]?.to).toEqual([row.to_address]);
      expect(copies[0]?.text).toBe(row.text_body);
      acceptedOverSmtp += copies.length + dropped.filter((d) => d.messageId === row.message_id).length;
    }
    expect(stored).toHaveLength(rows.length);
    const killCount = scenarios.reduce((n, s) => n + s.points.length, 0);
    expect(kills).toBe(killCount);
    // Each kill after "250" makes the next round send that message again, with the same Message-ID.
    const afterAccept = scenarios.reduce((n, s) => n + s.points.filter((p) => p === "accepted").length, 0);
    expect(dropped).toHaveLength(afterAccept);
    expect(catcher.stats()).toEqual({ stored: rows.length, repeats: afterAccept });
    console.log(
      `[faults] outbox: ${kills} kills over ${rows.length} rows; ${acceptedOverSmtp} SMTP acceptances, ` +
        `${stored.length} messages stored (one per row), ${dropped.length} repeats with the same Message-ID dropped`,
    );
  }, 300_000);
});
