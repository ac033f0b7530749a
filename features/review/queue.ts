import type { EveningMetrics } from "@/lib/classify/evenings";
import type { RuleSet } from "@/lib/classify/rules";
import type { Label, QueueItem } from "@/features/review/schemas";
import { METRIC_NAMES_READABLE, METRIC_UNITS, decidingMargin } from "@/features/review/thresholds";
import { describeAnomalies, describeWeak, type EveningFlags } from "@/features/review/flags";

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
  /** anomalies and weak-turbulence flag of the evening, when it has any */
  flags?: EveningFlags;
};

// Everything a person has already looked at goes behind everything nobody has.
const SEEN_PENALTY = 100;
// A flag is something a person should look at: an evening with anomalies ranks as if it were half
// its threshold distance (relative margin 0.5) closer to flipping, a weak-turbulence night a quarter.
// Both together add up. Reviewed evenings stay behind all unreviewed ones whatever they carry.
export const ANOMALY_WEIGHT = 0.5;
export const WEAK_TURBULENCE_WEIGHT = 0.25;

function fmt(v: number): string {
  return Math.abs(v) >= 10 ? v.toFixed(1) : Number(v.toPrecision(3)).toString();
}

/**
 * Ranks evenings by how much they need a person: unreviewed before reviewed (an override
 * counts as reviewed), unclassified first, then the smallest relative margin to a threshold of
 * the deciding rule, each brought forward by its anomalies and weak-turbulence flag (ANOMALY_WEIGHT,
 * WEAK_TURBULENCE_WEIGHT), which the reason then names first ("2 anomalies: CO2 rise after sunset").
 * Ties keep date order. `rulesFor` gives the rule set that labelled each.
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
    const anomalies = describeAnomalies(row.flags?.anomalies ?? []);
    const weak = describeWeak(row.flags?.weak ?? null);
    if (anomalies) need -= ANOMALY_WEIGHT;
    if (weak) need -= WEAK_TURBULENCE_WEIGHT;
    why = [anomalies, weak, why].filter((p) => p !== null).join("; ");
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
      anomalyCount: row.flags?.anomalies.length ?? 0,
      weakTurbulence: weak !== null,
    };
  });
  return items
    .map((item, i) => ({ item, i }))
    .sort((a, b) => a.item.need - b.item.need || a.i - b.i)
    .map(({ item }) => item);
}
