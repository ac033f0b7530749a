/*
 * Evenings inserted straight into the table, for tests that need labels but not the classifier.
 */
import { db } from "@/lib/db/knex";
import type { LabelKey } from "@/lib/ui/label-badge";

export type EveningSeed = {
  date: string;
  auto: LabelKey;
  /** an override on top of the automatic label */
  final?: LabelKey;
  note?: string;
  ruleSetId?: number | null;
  ruleSetVersion?: number | null;
  metrics?: Record<string, unknown>;
};

const METRICS = {
  sigmaWAfternoon: 0.6,
  sigmaWTransition: 0.4,
  sigmaWEvening: 0.15,
  sigmaWDecay: 0.25,
  ustarAfternoon: 0.4,
  ustarEvening: 0.08,
  windSpeedEvening: 0.9,
  wdShiftDeg: -12.5,
  sigmaThetaEvening: 30,
  zetaEvening: 0.3,
  hZeroCrossingMinutes: -20,
  coolingRateKPerH: -1.5,
  dewPointChangeK: -0.4,
  coverage: { afternoon: 1, transition: 1, evening: 1 },
  derived: [],
};

/** Inserts evenings of one site; returns their ids in order. */
export async function insertEvenings(siteId: number, seeds: readonly EveningSeed[]): Promise<number[]> {
  const ids: number[] = [];
  for (let i = 0; i < seeds.length; i += 500) {
    const chunk = seeds.slice(i, i + 500);
    await db("evenings").insert(
      chunk.map((s) => ({
        site_id: siteId,
        local_date: s.date,
        sunset_utc: `${s.date} 18:30:00`,
        civil_dusk_utc: `${s.date} 19:05:00`,
        auto_label: s.auto,
        rule: s.auto === "unclassified" ? null : `rule-${s.auto}`,
        reasons: JSON.stringify([`test evening ${s.date}`]),
        margins: JSON.stringify({ stillUstar: 0.02 }),
        metrics: JSON.stringify(s.metrics ?? METRICS),
        sigma_w_evening: 0.15,
        ws_evening: 0.9,
        rule_set_id: s.ruleSetId ?? null,
        rule_set_version: s.ruleSetVersion ?? null,
        final_label: s.final ?? s.auto,
        label_source: s.final ? "override" : "auto",
        override_note: s.note ?? null,
      })),
    );
  }
  const rows: Array<{ id: number; d: string }> = await db("evenings")
    .where({ site_id: siteId })
    .orderBy("local_date")
    .select("id", db.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS d"));
  const byDate = new Map(rows.map((r) => [r.d, r.id]));
  for (const s of seeds) ids.push(byDate.get(s.date) ?? -1);
  return ids;
}

/** Every date from `from` to `to` inclusive, YYYY-MM-DD. */
export function datesBetween(from: string, to: string): string[] {
  const out: string[] = [];
  for (let t = Date.parse(`${from}T00:00:00Z`); t <= Date.parse(`${to}T00:00:00Z`); t += 86_400_000) {
    out.push(new Date(t).toISOString().slice(0, 10));
  }
  return out;
}
