import type { AnomalyKind } from "@/lib/anomalies/detect";
import type { Label } from "@/lib/classify/evenings";

/*
 * Anomalies and weak-turbulence flags as the review screens show them: calendar markers, the
 * day's hover/focus text and the review queue's reason. Client-safe (no server imports).
 */

/** One anomaly as GET /api/sites/:id/anomalies returns it. */
export type AnomalyMark = {
  series: string;
  kind: AnomalyKind;
  start: string;
  end: string;
  peakScore: number;
  eveningDate: string;
  label: Label;
};

/** One night with flux periods under the u* threshold (`include=weak-turbulence`). */
export type WeakMark = {
  eveningDate: string;
  label: Label;
  fluxSeries: string;
  thresholdMs: number;
  weakPeriods: number;
  nightPeriods: number;
};

/** What an evening carries: anomalies by series and kind, and its weak-turbulence flag. */
export type EveningFlags = {
  anomalies: Array<{ series: string; kind: AnomalyKind }>;
  weak: Pick<WeakMark, "fluxSeries" | "thresholdMs" | "weakPeriods" | "nightPeriods"> | null;
};

export const ANOMALY_GLYPH = "◆";
export const WEAK_GLYPH = "≈";

const KIND_WORDS: Record<AnomalyKind, string> = {
  "rise-after-sunset": "rise after sunset",
  "rise-before-sunset": "rise before sunset",
  drop: "drop",
  spike: "spike",
};

export function kindWords(kind: AnomalyKind): string {
  return KIND_WORDS[kind];
}

/** Flags per local date, for the dates that have any. */
export function flagsByDate(
  anomalies: ReadonlyArray<Pick<AnomalyMark, "eveningDate" | "series" | "kind">>,
  weak: ReadonlyArray<Pick<WeakMark, "eveningDate" | "fluxSeries" | "thresholdMs" | "weakPeriods" | "nightPeriods">> = [],
): Map<string, EveningFlags> {
  const out = new Map<string, EveningFlags>();
  const at = (date: string) => {
    let f = out.get(date);
    if (!f) out.set(date, (f = { anomalies: [], weak: null }));
    return f;
  };
  for (const a of anomalies) at(a.eveningDate).anomalies.push({ series: a.series, kind: a.kind });
  for (const w of weak) {
    if (w.weakPeriods <= 0) continue;
    at(w.eveningDate).weak = {
      fluxSeries: w.fluxSeries,
      thresholdMs: w.thresholdMs,
      weakPeriods: w.weakPeriods,
      nightPeriods: w.nightPeriods,
    };
  }
  return out;
}

/** "2 anomalies: CO2 rise after sunset, O3 spike" (one phrase per series and kind), or null. */
export function describeAnomalies(list: EveningFlags["anomalies"]): string | null {
  if (list.length === 0) return null;
  const phrases: string[] = [];
  const counts = new Map<string, number>();
  for (const a of list) {
    const p = `${a.series} ${kindWords(a.kind)}`;
    if (!counts.has(p)) phrases.push(p);
    counts.set(p, (counts.get(p) ?? 0) + 1);
  }
  const parts = phrases.map((p) => (counts.get(p)! > 1 ? `${p} ×${counts.get(p)}` : p));
  return `${list.length} ${list.length === 1 ? "anomaly" : "anomalies"}: ${parts.join(", ")}`;
}

/** "weak turbulence: 5 of 12 night half-hours of FC under u* 0.21 m/s", or null. */
export function describeWeak(weak: EveningFlags["weak"]): string | null {
  if (!weak || weak.weakPeriods <= 0) return null;
  return `weak turbulence: ${weak.weakPeriods} of ${weak.nightPeriods} night half-hours of ${weak.fluxSeries} under u* ${weak.thresholdMs.toFixed(2)} m/s`;
}

/** Both descriptions joined, or null when the evening carries no flag. */
export function describeFlags(flags: EveningFlags | undefined): string | null {
  if (!flags) return null;
  const parts = [describeAnomalies(flags.anomalies), describeWeak(flags.weak)].filter((p) => p !== null);
  return parts.length ? parts.join("; ") : null;
}
