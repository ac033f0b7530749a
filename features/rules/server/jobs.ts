import "server-only";
import { db } from "@/lib/db/knex";
import { getRuleSet } from "@/lib/evenings/rulesets";
import { recomputeEvenings, type RecomputeResult } from "@/lib/evenings/recompute";
import { enqueueAnomalyDetection } from "@/lib/anomalies/server/enqueue";
import type { Job } from "@/lib/jobs/queue";
import type { JobContext, JobHandler } from "@/lib/jobs/worker";
import { RECLASSIFY_JOB, type ReclassifyPayload } from "@/features/rules/server/mutations";

type Extent = { first: string | null; last: string | null };

/** First and last local date with data or evenings at a site, on its data clock. */
async function siteExtent(siteId: number, utcOffsetHours: number): Promise<Extent> {
  const minutes = Math.round(utcOffsetHours * 60);
  const data: Extent | undefined = await db("half_hours")
    .where({ site_id: siteId })
    .first(
      db.raw("DATE_FORMAT(MIN(start_utc) + INTERVAL ? MINUTE, '%Y-%m-%d') AS first", [minutes]),
      db.raw("DATE_FORMAT(MAX(start_utc) + INTERVAL ? MINUTE, '%Y-%m-%d') AS last", [minutes]),
    );
  const stored: Extent | undefined = await db("evenings")
    .where({ site_id: siteId })
    .first(db.raw("DATE_FORMAT(MIN(local_date), '%Y-%m-%d') AS first"), db.raw("DATE_FORMAT(MAX(local_date), '%Y-%m-%d') AS last"));
  const firsts = [data?.first, stored?.first].filter((d): d is string => !!d).sort();
  const lasts = [data?.last, stored?.last].filter((d): d is string => !!d).sort();
  return { first: firsts[0] ?? null, last: lasts[lasts.length - 1] ?? null };
}

/**
 * The 'reclassify' job: re-labels every evening of the job's site with the rule set named in
 * its payload (overrides stay on top), reporting progress in evenings.
 */
export const reclassifyHandler: JobHandler = async (job: Job, ctx: JobContext): Promise<RecomputeResult | { computed: 0 }> => {
  const payload = job.payload as Partial<ReclassifyPayload> | null;
  if (job.siteId === null || typeof payload?.ruleSetId !== "number") throw new Error("reclassify job needs a site and a ruleSetId");
  const ruleSet = await getRuleSet(payload.ruleSetId);
  if (!ruleSet || ruleSet.groupId !== job.groupId) throw new Error(`rule set ${payload.ruleSetId} is not one of this group's`);
  const site: { utc_offset_hours: number | string } | undefined = await db("sites").where({ id: job.siteId }).first("utc_offset_hours");
  if (!site) throw new Error(`site ${job.siteId} no longer exists`);
  await ctx.progress({ phase: "reading", done: 0, total: 0, unit: "evenings" });
  const extent = await siteExtent(job.siteId, Number(site.utc_offset_hours));
  if (!extent.first || !extent.last) return { computed: 0 };
  const result = await recomputeEvenings(job.siteId, extent.first, extent.last, {
    ruleSet,
    onProgress: async (done, total) => {
      if (ctx.signal.aborted) throw new Error("cancelled");
      await ctx.progress({ phase: "classifying", done, total, unit: "evenings" });
    },
  });
  await ctx.progress({ phase: "done", done: result.computed, total: result.computed, unit: "evenings" });
  // the rule set also holds the anomaly thresholds and windows
  await enqueueAnomalyDetection(job.siteId, null, null);
  return result;
};

/** Handlers this feature gives the worker (scripts/worker.ts). */
export const rulesJobHandlers = { [RECLASSIFY_JOB]: reclassifyHandler } as const;
