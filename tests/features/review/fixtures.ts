/*
 * Evening rows written straight into this run's database for review tests. Metrics are
 * invented round numbers (synthetic), not measurements.
 */
import { db } from "@/lib/db/knex";
import type { EveningMetrics } from "@/lib/classify/evenings";
import type { Label } from "@/features/review/schemas";

export const SAMPLE_METRICS: EveningMetrics = {
  sigmaWAfternoon: 0.6,
  sigmaWTransition: 0.35,
  sigmaWEvening: 0.15,
  sigmaWDecay: 0.25,
  ustarAfternoon: 0.45,
  ustarEvening: 0.18,
  windSpeedEvening: 2.1,
  wdShiftDeg: 12,
  sigmaThetaEvening: 18,
  zetaEvening: 0.3,
  hZeroCrossingMinutes: -40,
  coolingRateKPerH: 1.2,
  dewPointChangeK: -0.3,
  coverage: { afternoon: 1, transition: 1, evening: 1 },
  derived: [],
};

export type EveningFixture = {
  date: string;
  autoLabel?: Label;
  rule?: string | null;
  reasons?: string[];
  margins?: Record<string, number>;
  metrics?: EveningMetrics;
  sunsetUtc?: string | null;
};

/** Inserts evenings for a site; returns their ids in the given order. */
export async function insertEvenings(siteId: number, evenings: EveningFixture[]): Promise<number[]> {
  const ids: number[] = [];
  for (const e of evenings) {
    const label = e.autoLabel ?? "local";
    const metrics = e.metrics ?? SAMPLE_METRICS;
    const sunset = e.sunsetUtc === undefined ? `${e.date} 19:10:00` : e.sunsetUtc;
    const [id] = await db("evenings").insert({
      site_id: siteId,
      local_date: e.date,
      sunset_utc: sunset,
      civil_dusk_utc: sunset ? db.raw("? + INTERVAL 35 MINUTE", [sunset]) : null,
      auto_label: label,
      rule: e.rule === undefined ? (label === "unclassified" ? null : "surface-cooling") : e.rule,
      reasons: JSON.stringify(
        e.reasons ??
          (label === "unclassified" ? ["coverage of evening window 0.2 < 0.5"] : ["surface-cooling: test"]),
      ),
      margins: JSON.stringify(e.margins ?? { decayedMixing: 0.45, stableLayer: 0.28 }),
      metrics: JSON.stringify(metrics),
      sigma_w_evening: metrics.sigmaWEvening,
      ws_evening: metrics.windSpeedEvening,
      final_label: label,
      label_source: "auto",
    });
    if (id === undefined) throw new Error("no id");
    await db("evening_events").insert({ evening_id: id, kind: "auto", to_label: label, rule_set_version: 1 });
    ids.push(id);
  }
  return ids;
}
