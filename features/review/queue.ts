import type { EveningMetrics } from "@/lib/classify/evenings";
import type { RuleSet } from "@/lib/classify/rules";
import type { Label, QueueItem } from "@/features/review/schemas";
import { METRIC_NAMES_READABLE, METRIC_UNITS, decidingMargin } from "@/features/review/thresholds";

export type QueueInput = {
  id: number;
  date: string;
  label: Label;
  autoLabel: Label;
  source: "auto" | "override";
  reviewed: boolean;
  version: number;
  rule: string | null;
  reasons: string[];
  margins: Record<string, number>;
  metrics: EveningMetrics;
};

// Everything a person has already looked at goes behind everything nobody has.
const SEEN_PENALTY = 100;

function fmt(v: number): string {
  return Math.abs(v) >= 10 ? v.toFixed(1) : Number(v.toPrecision(3)).toString();
}

/**
 * Ranks evenings by how much they need a person: unreviewed before reviewed (an override
 * counts as reviewed), unclassified first, then the smallest relative margin to a threshold of
 * the deciding rule. Ties keep date order. `rulesFor` gives the rule set that labelled each.
 */
export function rankQueue(rows: QueueInput[], rulesFor: (row: QueueInput) => RuleSet): QueueItem[] {
  const items = rows.map((row): QueueItem => {
    let need: number;
    let why: string;
    if (row.autoLabel === "unclassified") {
      need = 0;
      why = `unclassified: ${row.reasons[0] ?? "no reason recorded"}`;
    } else {
      const close = decidingMargin(rulesFor(row), row.metrics, row.margins, row.rule);
      if (close) {
        need = Math.min(close.relative, 50);
        const t = rulesFor(row).thresholds[close.name];
        const metric = t ? METRIC_NAMES_READABLE[t.metric] : close.name;
        const unit = t ? METRIC_UNITS[t.metric] : "";
        why = `${Math.round(close.relative * 100)} % from flipping: ${metric} ${fmt(close.threshold + (t?.op === "below" ? -close.margin : close.margin))} vs ${fmt(close.threshold)} ${unit} (${close.name})`;
      } else {
        need = 50;
        why = `${row.rule ?? "rule"}: no margin recorded`;
      }
    }
    if (row.source === "override") why = `overridden by a person; ${why}`;
    else if (row.reviewed) why = `reviewed; ${why}`;
    if (row.reviewed || row.source === "override") need += SEEN_PENALTY;
    return {
      id: row.id,
      date: row.date,
      label: row.label,
      autoLabel: row.autoLabel,
      source: row.source,
      reviewed: row.reviewed,
      version: row.version,
      rule: row.rule,
      need,
      why,
    };
  });
  return items
    .map((item, i) => ({ item, i }))
    .sort((a, b) => a.item.need - b.item.need || a.i - b.i)
    .map(({ item }) => item);
}
