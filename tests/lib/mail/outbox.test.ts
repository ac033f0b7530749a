import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import nodemailer from "nodemailer";
import { describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import type { MailOutboxRow } from "@/lib/db/tables";
import { env } from "@/lib/env";
import { deliverDue, queueMail, retryDelayMs } from "@/lib/mail/outbox";
import { startMailCatcher } from "@/lib/mail/catcher";
import { listCaughtMessages } from "@/lib/mail/caught";
import { smtpOptions } from "@/lib/mail/transport";
import { uniqueEmail } from "@/tests/support/db";
import { caughtFor, deliverFor } from "@/tests/support/mail";
import { freePort } from "@/tests/support/browser";

const row = async (id: number) => (await db("mail_outbox").where({ id }).first()) as MailOutboxRow;
const HOUR = 60 * 60_000;

describe("mail outbox", () => {
  test("a queued message reaches the local catcher once, with subject, body and Message-ID", async () => {
    const to = uniqueEmail("outbox");
    const id = await queueMail({
      kind: "test",
      to,
      subject: "Hello from the outbox",
      text: "Line one\nhttp://localhost:3000/x",
    });
    expect(id).toBeGreaterThan(0);
    const caught = await deliverFor(to);
    expect(caught).toHaveLength(1);
    expect(caught[0]).toMatchObject({ subject: "Hello from the outbox", to: [to] });
    expect(caught[0]?.text).toContain("http://localhost:3000/x");
    const sent = await row(id!);
    expect(sent).toMatchObject({ status: "sent", attempts: 1, lease_owner: null });
    expect(sent.delivered_id).toMatch(/^250/);
    expect(caught[0]?.messageId).toBe(sent.message_id);

    // Later rounds (another worker, hours later) leave a delivered row alone.
    await deliverDue({ filter: { to }, owner: "restarted-worker", now: new Date(Date.now() + 24 * HOUR) });
    expect(await caughtFor(to)).toHaveLength(1);
  });

  test("SMTP down, then up: retried with backoff and delivered exactly once", async () => {
    const to = uniqueEmail("down");
    const id = (await queueMail({ kind: "test", to, subject: "Survives an outage", text: "body" }))!;
    // A server of our own on a fixed port, so it can go away and come back.
    const port = await freePort();
    const dir = mkdtempSync(path.join(tmpdir(), "gloaming-outage-"));
    let server = await startMailCatcher({ dir, port });
    const smtp = nodemailer.createTransport({ ...smtpOptions(), port, connectionTimeout: 2000 });
    await server.close(); // the connection is refused: the message certainly was not delivered
    const down = smtp;

    const t0 = new Date();
    expect(await deliverDue({ transport: down, filter: { ids: [id] }, now: t0 })).toEqual({
      sent: 0,
      retrying: 1,
      failed: 0,
    });
    let r = await row(id);
    expect(r).toMatchObject({ status: "pending", attempts: 1 });
    expect(r.last_error).toBeTruthy();
    expect(r.next_attempt_at.getTime()).toBe(t0.getTime() + retryDelayMs(1));

    // Second failure doubles the delay.
    const t1 = new Date(r.next_attempt_at.getTime() + 1);
    await deliverDue({ transport: down, filter: { ids: [id] }, now: t1 });
    r = await row(id);
    expect(r.attempts).toBe(2);
    expect(r.next_attempt_at.getTime() - t1.getTime()).toBe(2 * retryDelayMs(1));

    // Not due yet: nothing is tried early.
    expect((await deliverDue({ transport: smtp, filter: { ids: [id] }, now: t1 })).sent).toBe(0);

    // SMTP is back and the time has come.
    server = await startMailCatcher({ dir, port });
    try {
      const t2 = new Date(r.next_attempt_at.getTime() + 1);
      expect((await deliverDue({ transport: smtp, filter: { ids: [id] }, now: t2 })).sent).toBe(1);
      // A restarted worker finds nothing left to do.
      expect(
        (
          await deliverDue({
            transport: smtp,
            filter: { ids: [id] },
            owner: "after-restart",
            now: new Date(t2.getTime() + 48 * HOUR),
          })
        ).sent,
      ).toBe(0);
      const caught = (await listCaughtMessages(dir)).filter((m) => m.to.includes(to));
      expect(caught).toHaveLength(1);
      expect(caught[0]?.subject).toBe("Survives an outage");
      expect((await row(id)).status).toBe("sent");
    } finally {
      await server.close();
      rmSync(dir, { recursive: true, force: true });
    }
  });

  test("a row leased by a worker that died is left alone until the lease runs out, then sent once", async () => {
    const to = uniqueEmail("lease");
    const id = (await queueMail({ kind: "test", to, subject: "Leased", text: "body" }))!;
    const now = new Date();
    await db("mail_outbox")
      .where({ id })
      .update({
        status: "sending",
        lease_owner: "dead-worker",
        lease_until: new Date(now.getTime() + 60_000),
        attempts: 1,
      });
    expect((await deliverDue({ filter: { ids: [id] }, now })).sent).toBe(0);
    expect((await deliverDue({ filter: { ids: [id] }, now: new Date(now.getTime() + 61_000) })).sent).toBe(1);
    expect(await caughtFor(to)).toHaveLength(1);
    expect(await row(id)).toMatchObject({ status: "sent", attempts: 2 });
  });

  test("a dedupe key queues a message only once", async () => {
    const to = uniqueEmail("dedupe");
    const key = `test:${to}`;
    const first = await queueMail({ kind: "test", to, subject: "Once", text: "a", dedupeKey: key });
    const second = await queueMail({ kind: "test", to, subject: "Once", text: "a", dedupeKey: key });
    expect(first).toBeGreaterThan(0);
    expect(second).toBeNull();
    expect(await db("mail_outbox").where({ to_address: to }).count({ n: "*" }).first()).toEqual({ n: 1 });
  });

  test("a message written in a transaction that rolls back is never sent", async () => {
    const to = uniqueEmail("rollback");
    await expect(
      db.transaction(async (trx) => {
        await queueMail({ kind: "test", to, subject: "Never", text: "a" }, trx);
        throw new Error("the event failed");
      }),
    ).rejects.toThrow("the event failed");
    expect(await deliverFor(to)).toHaveLength(0);
  });

  test("tests send to the local catcher on loopback", () => {
    expect(env.MAIL_CATCHER).toBe(true);
    expect(smtpOptions()).toMatchObject({ host: "127.0.0.1", port: env.MAIL_CATCHER_PORT });
  });
});
