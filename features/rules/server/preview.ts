import "server-only";
import { classifyTable } from "@/lib/classify/evenings";
import { parseRuleSet } from "@/lib/classify/rules";
import { db } from "@/lib/db/knex";
import { loadHalfHours } from "@/lib/evenings/load";
import type { SessionUser } from "@/lib/auth/session";
import type { LabelKey } from "@/lib/ui/label-badge";
import type { Counts, PreviewChange, PreviewInput, PreviewResult } from "@/features/rules/schemas";
import { rulesSite } from "@/features/rules/server/access";

const DAY_MS = 86_400_000;
const zero = (): Counts => ({ local: 0, stagnant: 0, advective: 0, unclassified: 0 });

/**
 * What-if: classifies a site's stored half-hours of a period with `input.definition` and
 * compares with the stored automatic labels. Reads only; nothing is written.
 */
export async function previewRuleSet(user: SessionUser, input: PreviewInput): Promise<PreviewResult> {
  const { site } = await rulesSite(user, input.siteId, "analyst");
  const rules = parseRuleSet(input.definition);
  const offsetMs = site.utcOffsetHours * 3_600_000;
  // a day either side, so windows that start before local midnight or end after it are whole
  const fromMs = Date.parse(`${input.from}T00:00:00Z`) - offsetMs - DAY_MS;
  const toMs = Date.parse(`${input.to}T00:00:00Z`) - offsetMs + 2 * DAY_MS;
  const table = await loadHalfHours(site.id, fromMs, toMs);
  const results = table.startMs.length ? classifyTable(table, site, rules) : [];

  const stored: Array<{ id: number; d: string; auto_label: LabelKey; final_label: LabelKey; label_source: string }> = await db("evenings")
    .where({ site_id: site.id })
    .andWhere("local_date", ">=", input.from)
    .andWhere("local_date", "<=", input.to)
    .select("id", db.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS d"), "auto_label", "final_label", "label_source");
  const byDate = new Map(stored.map((s) => [s.d, s]));

  const before = zero();
  const after = zero();
  for (const s of stored) before[s.auto_label]++;
  const changes: PreviewChange[] = [];
  let evenings = 0;
  for (const r of results) {
    if (r.date < input.from || r.date > input.to) continue;
    evenings++;
    after[r.label]++;
    const s = byDate.get(r.date);
    if (s?.auto_label === r.label) continue;
    changes.push({
      date: r.date,
      eveningId: s ? Number(s.id) : null,
      before: s?.auto_label ?? null,
      after: r.label,
      override: s?.label_source === "override" ? s.final_label : null,
      rule: r.rule,
    });
  }
  return {
    siteId: site.id,
    from: input.from,
    to: input.to,
    evenings,
    before,
    after,
    changes,
    changesUnderOverride: changes.filter((c) => c.override !== null).length,
  };
}
