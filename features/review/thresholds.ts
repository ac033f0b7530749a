import { metricValue, type EveningMetrics } from "@/lib/classify/evenings";
import type { MetricName, RuleSet } from "@/lib/classify/rules";
import type { ThresholdRow } from "@/features/review/schemas";

/** Units of the rule metrics as the evening page prints them. */
export const METRIC_UNITS: Record<MetricName, string> = {
  sigmaWAfternoon: "m/s",
  sigmaWTransition: "m/s",
  sigmaWEvening: "m/s",
  sigmaWDecay: "ratio",
  ustarAfternoon: "m/s",
  ustarEvening: "m/s",
  ustarDecay: "ratio",
  windSpeedEvening: "m/s",
  wdShiftDeg: "°",
  wdShiftAbsDeg: "°",
  sigmaThetaEvening: "°",
  zetaEvening: "z/L",
  hZeroCrossingMinutes: "min",
  coolingRateKPerH: "K/h",
  dewPointChangeK: "K",
};

/** Readable names of the rule metrics. */
export const METRIC_NAMES_READABLE: Record<MetricName, string> = {
  sigmaWAfternoon: "σw afternoon",
  sigmaWTransition: "σw transition",
  sigmaWEvening: "σw evening",
  sigmaWDecay: "σw evening / afternoon",
  ustarAfternoon: "u* afternoon",
  ustarEvening: "u* evening",
  ustarDecay: "u* evening / afternoon",
  windSpeedEvening: "wind speed evening",
  wdShiftDeg: "direction shift",
  wdShiftAbsDeg: "|direction shift|",
  sigmaThetaEvening: "σθ evening",
  zetaEvening: "z/L evening",
  hZeroCrossingMinutes: "H < 0 from (min after sunset)",
  coolingRateKPerH: "cooling rate",
  dewPointChangeK: "dew-point change",
};

/**
 * Every threshold of the rule set beside the evening's metric. The threshold in force is
 * recovered from the stored margin where one exists, so site-relative (percentile) thresholds
 * show the value that was actually used, not the percentile's fallback.
 */
export function thresholdRows(
  rules: RuleSet,
  metrics: EveningMetrics,
  margins: Record<string, number>,
  decidingRule: string | null,
): ThresholdRow[] {
  const deciding = rules.rules.find((r) => r.id === decidingRule);
  const decidingNames = new Set(deciding ? [...deciding.all, ...deciding.optional] : []);
  return Object.entries(rules.thresholds).map(([name, t]) => {
    const value = metricValue(metrics, t.metric);
    const margin = margins[name];
    let threshold: number | null = t.kind === "absolute" ? t.value : null;
    if (margin !== undefined && value !== null)
      threshold = t.op === "below" ? value + margin : value - margin;
    return {
      name,
      metric: t.metric,
      unit: METRIC_UNITS[t.metric],
      op: t.op,
      threshold,
      value,
      margin: margin ?? null,
      description:
        t.description ??
        (t.kind === "percentile" ? `${t.percentile}th percentile of the site's evenings` : ""),
      rules: rules.rules.filter((r) => r.all.includes(name) || r.optional.includes(name)).map((r) => r.id),
      deciding: decidingNames.has(name),
    };
  });
}

/**
 * The smallest relative margin (|margin| / |threshold|) among the thresholds of the deciding
 * rule: how close the evening came to another label. Relative, so m/s and degrees compare.
 * Null when no deciding threshold has a margin.
 */
export function decidingMargin(
  rules: RuleSet,
  metrics: EveningMetrics,
  margins: Record<string, number>,
  decidingRule: string | null,
): { name: string; relative: number; margin: number; threshold: number } | null {
  let best: { name: string; relative: number; margin: number; threshold: number } | null = null;
  for (const row of thresholdRows(rules, metrics, margins, decidingRule)) {
    if (!row.deciding || row.margin === null || row.threshold === null) continue;
    const relative = Math.abs(row.margin) / Math.max(Math.abs(row.threshold), 1e-6);
    if (!best || relative < best.relative)
      best = { name: row.name, relative, margin: row.margin, threshold: row.threshold };
  }
  return best;
}
