import { anomalySettingsSchema, type AnomalySettings, type RuleSet } from "@/lib/classify/rules";

/** Anomaly settings with the screened window resolved to minutes relative to sunset. */
export type ResolvedAnomalySettings = Omit<AnomalySettings, "window"> & {
  window: { startMinutes: number; endMinutes: number };
};

/**
 * The anomaly settings of a rule set: its `anomalies` section with defaults filled in, and the
 * screened window defaulting to the start of its transition window through the end of its
 * evening window (S-1 h to S+3 h in the default rule set).
 */
export function anomalySettingsOf(ruleSet: Pick<RuleSet, "windows" | "anomalies">): ResolvedAnomalySettings {
  const parsed = anomalySettingsSchema.parse(ruleSet.anomalies ?? {});
  const window = parsed.window ?? {
    startMinutes: ruleSet.windows.transition.startMinutes,
    endMinutes: ruleSet.windows.evening.endMinutes,
  };
  return { ...parsed, window };
}
