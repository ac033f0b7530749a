import "server-only";
import { db } from "@/lib/db/knex";
import { queueMail } from "@/lib/mail/outbox";
import { appLink } from "@/lib/mail/transport";

/*
 * The weekly digest: for each person who opted in, label counts (and anomalies, where the
 * anomaly detection has stored any) per site of each of their groups for the past week.
 * One mail per person and week (dedupe key "digest:<user>:<monday>").
 */

const LABELS = ["local", "stagnant", "advective", "unclassified"] as const;
type Label = (typeof LABELS)[number];
const LABEL_WORDS: Record<Label, string> = {
  local: "locally driven",
  stagnant: "stagnant",
  advective: "advective",
  unclassified: "unclassified",
};

/** Digests are queued during the first days of a week, for the week before. */
export const DIGEST_QUEUE_DAYS = 2;

/** The last complete week before `now`: Monday 00:00 UTC (inclusive) to the next Monday (exclusive). */
export function lastCompleteWeek(now: Date): { start: Date; end: Date } {
  const day = (now.getUTCDay() + 6) % 7; // Monday = 0
  const end = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate() - day));
  return { start: new Date(end.getTime() - 7 * 86_400_000), end };
}

const ymd = (d: Date) => d.toISOString().slice(0, 10);

export type SiteWeek = {
  groupName: string;
  siteId: number;
  siteName: string;
  counts: Record<Label, number>;
  overridden: number;
  /** null when no anomaly results are stored in this installation */
  anomalies: number | null;
};

async function anomalyCounts(siteIds: number[], start: Date, end: Date): Promise<Map<number, number> | null> {
  if (siteIds.length === 0 || !(await db.schema.hasTable("anomalies")) || !(await db.schema.hasColumn("anomalies", "evening_id"))) {
    return null;
  }
  const rows = await db("anomalies as a")
    .join("evenings as e", "e.id", "a.evening_id")
    .whereIn("e.site_id", siteIds)
    .andWhere("e.local_date", ">=", ymd(start))
    .andWhere("e.local_date", "<", ymd(end))
    .groupBy("e.site_id")
    .select<Array<{ site_id: number; n: number | string }>>("e.site_id", db.raw("COUNT(*) AS n"));
  return new Map(rows.map((r) => [r.site_id, Number(r.n)]));
}

/** What one person's digest for the week starting `start` says, per site. */
export async function digestFor(userId: string, start: Date, end: Date): Promise<SiteWeek[]> {
  const sites = await db("memberships as m")
    .join("research_groups as g", "g.id", "m.group_id")
    .join("sites as s", "s.group_id", "g.id")
    .where("m.user_id", userId)
    .orderBy(["g.name", "s.name"])
    .select<Array<{ groupName: string; siteId: number; siteName: string }>>({ groupName: "g.name", siteId: "s.id", siteName: "s.name" });
  const ids = sites.map((s) => s.siteId);
  type CountRow = { site_id: number; final_label: Label; n: number | string; overridden: number | string | null };
  const counts = ids.length
    ? await db("evenings")
        .whereIn("site_id", ids)
        .andWhere("local_date", ">=", ymd(start))
        .andWhere("local_date", "<", ymd(end))
        .groupBy("site_id", "final_label")
        .select<CountRow[]>("site_id", "final_label", db.raw("COUNT(*) AS n"), db.raw("SUM(label_source = 'override') AS overridden"))
    : [];
  const anomalies = await anomalyCounts(ids, start, end);
  return sites.map((s) => {
    const c: Record<Label, number> = { local: 0, stagnant: 0, advective: 0, unclassified: 0 };
    let overridden = 0;
    for (const r of counts.filter((r) => r.site_id === s.siteId)) {
      c[r.final_label] += Number(r.n);
      overridden += Number(r.overridden ?? 0);
    }
    return { ...s, counts: c, overridden, anomalies: anomalies ? (anomalies.get(s.siteId) ?? 0) : null };
  });
}

/** The digest's plain text. */
export function digestText(displayName: string, start: Date, end: Date, weeks: SiteWeek[]): string {
  const last = new Date(end.getTime() - 86_400_000);
  const lines = [`Hello ${displayName},`, "", `Evenings of ${ymd(start)} to ${ymd(last)} (local dates), per site:`, ""];
  let group = "";
  for (const w of weeks) {
    if (w.groupName !== group) {
      group = w.groupName;
      lines.push(`${group}`);
    }
    const total = LABELS.reduce((sum, l) => sum + w.counts[l], 0);
    lines.push(`  ${w.siteName}: ${total} evening${total === 1 ? "" : "s"} labelled`);
    if (total > 0) lines.push(`    ${LABELS.map((l) => `${LABEL_WORDS[l]} ${w.counts[l]}`).join(", ")}`);
    if (w.overridden > 0) lines.push(`    overridden by an analyst: ${w.overridden}`);
    lines.push(`    anomalies: ${w.anomalies === null ? "not computed" : w.anomalies}`);
    lines.push(`    ${appLink(`/sites/${w.siteId}`)}`);
  }
  if (weeks.length === 0) lines.push("  Your groups have no sites yet.");
  lines.push(
    "",
    "Labels are screening aids for research data; thresholds are site-dependent.",
    "",
    "You get this digest because you turned it on; turn it off in your settings:",
    appLink("/settings"),
  );
  return lines.join("\n");
}

/**
 * Queues last week's digest for every person who opted in and has not had it yet; does
 * nothing after the first DIGEST_QUEUE_DAYS of a week. Returns how many were queued.
 */
export async function queueWeeklyDigests(now: Date = new Date()): Promise<number> {
  const { start, end } = lastCompleteWeek(now);
  if (now.getTime() >= end.getTime() + DIGEST_QUEUE_DAYS * 86_400_000) return 0;
  const people = await db("notification_preferences as p")
    .join("users as u", "u.id", "p.user_id")
    .where("p.weekly_digest", true)
    .whereExists(db("memberships").select(db.raw("1")).whereRaw("memberships.user_id = u.id"))
    .whereNotExists(
      db("mail_outbox").select(db.raw("1")).where("dedupe_key", db.raw("CONCAT('digest:', u.id, ':', ?)", [ymd(start)])),
    )
    .select<Array<{ id: string; email: string; display_name: string }>>("u.id", "u.email", "u.display_name");
  let queued = 0;
  for (const p of people) {
    const weeks = await digestFor(p.id, start, end);
    const id = await queueMail({
      kind: "weekly_digest",
      to: p.email,
      subject: `Gloaming weekly digest, week of ${ymd(start)}`,
      text: digestText(p.display_name, start, end, weeks),
      dedupeKey: `digest:${p.id}:${ymd(start)}`,
    });
    if (id !== null) queued++;
  }
  return queued;
}
