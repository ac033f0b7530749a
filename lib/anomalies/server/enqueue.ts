import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";
import { jsonColumn } from "@/lib/db/json";
import { enqueueJob } from "@/lib/jobs/queue";

/** Job kind of the anomaly screen (handler: features/anomalies/server/jobs.ts). */
export const ANOMALY_JOB_KIND = "anomalies";

/** Payload of an anomalies job: local dates YYYY-MM-DD, both inclusive; null = open end. */
export type AnomalyJobPayload = { from: string | null; to: string | null };

/**
 * Days beyond changed data whose evenings are screened again: their moving baselines (10 days
 * each side by default) reach into it.
 */
export const BASELINE_REACH_DAYS = 12;

const shift = (date: string | null, days: number) =>
  date === null
    ? null
    : new Date(Date.parse(`${date}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);

const earlier = (a: string | null, b: string | null) => (a === null || b === null ? null : a < b ? a : b);
const later = (a: string | null, b: string | null) => (a === null || b === null ? null : a > b ? a : b);

/**
 * Queues the anomaly screen for a site after its data or labels changed on local dates
 * [from, to] (null = open end); evenings within BASELINE_REACH_DAYS of the range are screened
 * too. Call it after an import lands and after a rule set is activated; pass `trx` to queue it
 * with the rows that ask for it. A job still queued for the site is widened to
 * cover both ranges instead of queueing a second one. Returns the job id.
 */
export async function enqueueAnomalyDetection(
  siteId: number,
  from: string | null,
  to: string | null,
  trx?: Knex | Knex.Transaction,
  createdBy?: string | null,
): Promise<number> {
  const conn = trx ?? db;
  from = shift(from, -BASELINE_REACH_DAYS);
  to = shift(to, BASELINE_REACH_DAYS);
  const site = await conn("sites").where({ id: siteId }).first("group_id");
  if (!site) throw new Error(`site ${siteId} does not exist`);
  const queued = await conn("jobs")
    .where({ site_id: siteId, kind: ANOMALY_JOB_KIND, status: "queued" })
    .orderBy("id", "desc")
    .first<{ id: number; payload: unknown } | undefined>("id", "payload");
  if (queued) {
    const p = jsonColumn<AnomalyJobPayload>(queued.payload) ?? { from: null, to: null };
    const payload: AnomalyJobPayload = { from: earlier(p.from, from), to: later(p.to, to) };
    const n = await conn("jobs")
      .where({ id: queued.id, status: "queued" })
      .update({ payload: JSON.stringify(payload) });
    // a worker may have claimed it meanwhile: then the range needs a job of its own
    if (n > 0) return Number(queued.id);
  }
  const payload: AnomalyJobPayload = { from, to };
  return enqueueJob(
    { kind: ANOMALY_JOB_KIND, groupId: site.group_id, siteId, payload, createdBy: createdBy ?? null },
    conn,
  );
}
