import "server-only";
import { db } from "@/lib/db/knex";
import { queueMail } from "@/lib/mail/outbox";
import { appLink } from "@/lib/mail/transport";

/*
 * Import finished/failed notices. The jobs table is the durable record of the event; this
 * sweep turns each finished import job into at most one mail (dedupe key "job-notice:<id>"),
 * so a notice is neither lost when the worker stops nor sent twice when the sweep repeats.
 * It runs in the worker instead of inside the import job's own transaction because features
 * do not import each other (imports cannot call notices).
 */

/** Finished jobs older than this are not announced any more (e.g. after a long outage), in ms. */
export const NOTICE_WINDOW_MS = 3 * 24 * 60 * 60_000;

type FinishedJob = {
  id: number;
  status: "done" | "failed";
  site_id: number | null;
  message: string | null;
  result: unknown;
  created_by: string;
  finished_at: Date;
  email: string;
  display_name: string;
  site_name: string | null;
};

function describeResult(result: unknown): string[] {
  const r = typeof result === "string" ? (JSON.parse(result) as unknown) : result;
  if (typeof r !== "object" || r === null) return [];
  const lines: string[] = [];
  for (const [key, value] of Object.entries(r)) {
    if (typeof value === "number" || typeof value === "string" || typeof value === "boolean") {
      lines.push(`  ${key.replace(/([a-z])([A-Z])/g, "$1 $2").toLowerCase()}: ${String(value)}`);
    }
  }
  return lines.slice(0, 12);
}

/** Queues a notice for every import job that finished recently and was not announced yet; returns how many. */
export async function queueImportNotices(now: Date = new Date()): Promise<number> {
  const jobs = await db("jobs as j")
    .join("users as u", "u.id", "j.created_by")
    .leftJoin("sites as s", "s.id", "j.site_id")
    .leftJoin("notification_preferences as p", "p.user_id", "j.created_by")
    .where("j.kind", "import")
    .whereIn("j.status", ["done", "failed"])
    .andWhere("j.finished_at", ">", new Date(now.getTime() - NOTICE_WINDOW_MS))
    .whereNotExists(db("mail_outbox").select(db.raw("1")).whereRaw("dedupe_key = CONCAT('job-notice:', j.id)"))
    .andWhere((q) => {
      q.whereNull("p.user_id").orWhere("p.import_notices", true);
    })
    .orderBy("j.id")
    .limit(200)
    .select<FinishedJob[]>("j.id", "j.status", "j.site_id", "j.message", "j.result", "j.created_by", "j.finished_at", "u.email", "u.display_name", {
      site_name: "s.name",
    });

  let queued = 0;
  for (const job of jobs) {
    const site = job.site_name ?? "a deleted site";
    const ok = job.status === "done";
    const link = job.site_id ? appLink(`/sites/${job.site_id}/imports`) : appLink("/sites");
    const text = [
      `Hello ${job.display_name},`,
      "",
      ok ? `The import you started for ${site} has finished.` : `The import you started for ${site} has failed.`,
      ...(job.message ? ["", job.message] : []),
      ...(ok ? ["", ...describeResult(job.result)] : []),
      "",
      "Details and the validation report:",
      link,
      "",
      "You get this because import notices are on in your settings:",
      appLink("/settings"),
    ].join("\n");
    const id = await queueMail({
      kind: "import_notice",
      to: job.email,
      subject: ok ? `Import finished: ${site}` : `Import failed: ${site}`,
      text,
      dedupeKey: `job-notice:${job.id}`,
    });
    if (id !== null) queued++;
  }
  return queued;
}
