import "server-only";
import { randomBytes } from "node:crypto";
import { hostname } from "node:os";
import type { Knex } from "knex";
import type { Transporter } from "nodemailer";
import type SMTPTransport from "nodemailer/lib/smtp-transport";
import { db } from "@/lib/db/knex";
import type { MailOutboxRow } from "@/lib/db/tables";
import { describeDatabaseError, isDatabaseUnavailable } from "@/lib/db/errors";
import { env } from "@/lib/env";
import { mailTransport } from "@/lib/mail/transport";

/*
 * The mail outbox. Producers insert a row in the transaction of the event that causes the
 * mail; the worker delivers it. A row is claimed with a lease (status "sending") in its own
 * committed transaction before SMTP is spoken, and marked "sent" with the server's id right
 * after, so a restart never picks up a delivered row again. Only a crash between the SMTP
 * answer and that update can repeat a message; the retry then carries the same Message-ID
 * (fixed when the row is first claimed), so a receiver that keeps one copy per Message-ID, as
 * the local catcher does, still holds it once. No protocol can close that window from the
 * sender's side alone: SMTP has no way to ask whether a message already arrived.
 */

export type OutgoingMail = {
  /** what caused it, e.g. "invitation", "password_reset", "import_notice", "weekly_digest" */
  kind: string;
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** Makes queueing idempotent: a second row with the same key is silently dropped. */
  dedupeKey?: string;
};

/** Attempts before a message is given up as "failed". */
export const MAX_ATTEMPTS = 8;
/** First retry delay in ms; doubles per attempt up to RETRY_CAP_MS. */
export const RETRY_BASE_MS = 30_000;
export const RETRY_CAP_MS = 60 * 60_000;
/** How long a claim protects a row from other workers, in ms. */
export const LEASE_MS = 5 * 60_000;

/** Delay before attempt `attempts + 1`, after `attempts` failures (exponential, capped), in ms. */
export function retryDelayMs(attempts: number): number {
  return Math.min(RETRY_CAP_MS, RETRY_BASE_MS * 2 ** Math.max(0, attempts - 1));
}

/**
 * Puts a message in the outbox; pass the transaction of the event so both commit together.
 * Returns the row id, or null when `dedupeKey` was queued before.
 */
export async function queueMail(
  mail: OutgoingMail,
  trx: Knex | Knex.Transaction = db,
): Promise<number | null> {
  const row = {
    dedupe_key: mail.dedupeKey ?? null,
    kind: mail.kind,
    to_address: mail.to,
    subject: mail.subject.slice(0, 255),
    text_body: mail.text,
    html_body: mail.html ?? null,
  };
  if (mail.dedupeKey === undefined) {
    const [id] = await trx("mail_outbox").insert(row);
    return id ?? null;
  }
  const [id] = await trx("mail_outbox").insert(row).onConflict("dedupe_key").ignore();
  // INSERT IGNORE reports id 0 when the row was dropped.
  return id ? id : null;
}

function messageIdFor(id: number): string {
  const domain = /@([^>\s]+)>?\s*$/.exec(env.MAIL_FROM)?.[1] ?? "gloaming.localhost";
  return `<outbox-${id}.${randomBytes(6).toString("hex")}@${domain}>`;
}

/** Claims up to `limit` due rows for `owner`: pending ones whose time has come and sending ones whose lease ran out. */
async function claim(
  owner: string,
  now: Date,
  limit: number,
  filter: OutboxFilter,
  leaseMs: number,
): Promise<MailOutboxRow[]> {
  return db.transaction(async (trx) => {
    const q = trx("mail_outbox").where((w) => {
      w.where((d) => {
        d.where("status", "pending").andWhere("next_attempt_at", "<=", now);
      }).orWhere((d) => {
        d.where("status", "sending").andWhere("lease_until", "<", now);
      });
    });
    if (filter.ids) q.whereIn("id", filter.ids);
    if (filter.to) q.andWhere("to_address", filter.to);
    const ids: number[] = await q.orderBy("id").limit(limit).forUpdate().skipLocked().pluck("id");
    if (ids.length === 0) return [];
    await trx("mail_outbox")
      .whereIn("id", ids)
      .update({
        status: "sending",
        lease_owner: owner,
        lease_until: new Date(now.getTime() + leaseMs),
        attempts: trx.raw("attempts + 1"),
      });
    const rows = await trx("mail_outbox").whereIn("id", ids).orderBy("id");
    // A message keeps its Message-ID across attempts.
    for (const row of rows) {
      if (!row.message_id) {
        row.message_id = messageIdFor(row.id);
        await trx("mail_outbox").where({ id: row.id }).update({ message_id: row.message_id });
      }
    }
    return rows;
  });
}

export type DeliveryReport = { sent: number; retrying: number; failed: number };

/** Restricts a delivery round to some rows (tests, manual re-sends). */
export type OutboxFilter = { ids?: number[]; to?: string };

/**
 * Delivers the messages that are due. `now` is the clock used for due times, leases and
 * backoff (tests move it forward instead of waiting); `leaseMs` how long a claimed row stays
 * this worker's (default LEASE_MS; fault tests shorten it to restart a killed worker quickly).
 */
export async function deliverDue(
  opts: {
    transport?: Transporter<SMTPTransport.SentMessageInfo>;
    now?: Date;
    owner?: string;
    limit?: number;
    filter?: OutboxFilter;
    leaseMs?: number;
  } = {},
): Promise<DeliveryReport> {
  const now = opts.now ?? new Date();
  const owner = opts.owner ?? defaultOwner;
  const transport = opts.transport ?? mailTransport();
  const report: DeliveryReport = { sent: 0, retrying: 0, failed: 0 };
  const rows = await claim(owner, now, opts.limit ?? 20, opts.filter ?? {}, opts.leaseMs ?? LEASE_MS);
  for (const row of rows) {
    try {
      const info = await transport.sendMail({
        from: env.MAIL_FROM,
        to: row.to_address,
        subject: row.subject,
        text: row.text_body,
        ...(row.html_body ? { html: row.html_body } : {}),
        messageId: row.message_id ?? undefined,
        headers: { "X-Gloaming-Kind": row.kind },
      });
      await db("mail_outbox")
        .where({ id: row.id, lease_owner: owner })
        .update({
          status: "sent",
          sent_at: new Date(),
          delivered_id: String(info.response ?? info.messageId).slice(0, 255),
          lease_owner: null,
          lease_until: null,
          last_error: null,
        });
      report.sent++;
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      const giveUp = row.attempts >= MAX_ATTEMPTS;
      await db("mail_outbox")
        .where({ id: row.id, lease_owner: owner })
        .update({
          status: giveUp ? "failed" : "pending",
          next_attempt_at: new Date(now.getTime() + retryDelayMs(row.attempts)),
          lease_owner: null,
          lease_until: null,
          last_error: message.slice(0, 2000),
        });
      if (giveUp) report.failed++;
      else report.retrying++;
    }
  }
  return report;
}

const defaultOwner = `${hostname()}:${process.pid}:${randomBytes(3).toString("hex")}`.slice(0, 64);

/**
 * The worker's outbox loop: delivers due mail every `pollMs` until `signal` aborts.
 * Errors (database away, SMTP misconfigured) are logged and the loop carries on.
 */
export async function runOutbox({
  signal,
  pollMs = 2_000,
}: {
  signal: AbortSignal;
  pollMs?: number;
}): Promise<void> {
  let failures = 0;
  while (!signal.aborted) {
    let busy = false;
    try {
      const r = await deliverDue();
      if (failures > 0) console.error(`[outbox] delivering again after ${failures} failed round(s)`);
      failures = 0;
      busy = r.sent + r.retrying + r.failed > 0;
      if (r.failed > 0)
        console.error(`[outbox] ${r.failed} message(s) given up after ${MAX_ATTEMPTS} attempts`);
    } catch (err) {
      failures++;
      // Database away: one line per round and a growing pause (2 s doubling to 30 s), not a stack every poll.
      const delay = Math.max(pollMs, Math.min(30_000, 2000 * 2 ** (failures - 1)));
      if (isDatabaseUnavailable(err)) {
        console.error(
          `[outbox] database unavailable (${describeDatabaseError(err)}); retrying in ${delay / 1000} s`,
        );
      } else {
        console.error("[outbox] delivery round failed", err);
      }
      await sleep(delay, signal);
      continue;
    }
    if (!busy) await sleep(pollMs, signal);
  }
}

function sleep(ms: number, signal: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    const t = setTimeout(done, ms);
    function done() {
      clearTimeout(t);
      signal.removeEventListener("abort", done);
      resolve();
    }
    signal.addEventListener("abort", done, { once: true });
  });
}
