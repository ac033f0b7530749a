import type { HalfHourTable } from "@/lib/series/types";
import { eveningSun, localDateOf, localMidnightUtcMs, type EveningSun } from "@/lib/physics/sun";
import { quantileSorted } from "simple-statistics";
import {
  eveningMetrics,
  prepareColumns,
  variableCoverage,
  type ComputedEvening,
  type EveningMetrics,
  type PreparedColumns,
} from "./metrics";
import { DEFAULT_RULE_SET, type MetricName, type RuleSet, type Threshold } from "./rules";
import { siteProblems, type SiteParams } from "./site";

export type { EveningMetrics } from "./metrics";

export type Label = "local" | "stagnant" | "advective" | "unclassified";

export interface EveningResult {
  /** local date YYYY-MM-DD (of the data clock's offset) */
  date: string;
  label: Label;
  /** ISO 8601 UTC; null for polar day/night */
  sunsetUtc: string | null;
  civilDuskUtc: string | null;
  /** id of the rule that decided, null when unclassified */
  rule: string | null;
  /** human-readable: why this label, or why unclassified */
  reasons: string[];
  /** threshold name -> signed distance of its metric to the threshold (metric units); positive = condition holds */
  margins: Record<string, number>;
  metrics: EveningMetrics;
}

const DAY_MS = 86_400_000;

// Sun times dominate the per-evening cost and do not depend on the data: keep them across calls
// (re-classifying one site with another rule set is the common case). Bounded; cleared when full.
const SUN_CACHE_LIMIT = 200_000;
const sunCache = new Map<string, EveningSun>();
function cachedEveningSun(date: string, site: SiteParams): EveningSun {
  const key = `${site.latitudeDeg},${site.longitudeDeg},${site.utcOffsetHours},${date}`;
  let sun = sunCache.get(key);
  if (!sun) {
    if (sunCache.size >= SUN_CACHE_LIMIT) sunCache.clear();
    sun = eveningSun(date, site.latitudeDeg, site.longitudeDeg, site.utcOffsetHours);
    sunCache.set(key, sun);
  }
  return sun;
}

const UNIT: Partial<Record<MetricName, string>> = {
  sigmaWAfternoon: "m/s",
  sigmaWTransition: "m/s",
  sigmaWEvening: "m/s",
  ustarAfternoon: "m/s",
  ustarEvening: "m/s",
  windSpeedEvening: "m/s",
  wdShiftDeg: "deg",
  wdShiftAbsDeg: "deg",
  sigmaThetaEvening: "deg",
  hZeroCrossingMinutes: "min",
  coolingRateKPerH: "K/h",
  dewPointChangeK: "K",
};

/** Value of a rule metric for one evening (including the derived ones rules may use). */
export function metricValue(m: EveningMetrics, name: MetricName): number | null {
  switch (name) {
    case "wdShiftAbsDeg":
      return m.wdShiftDeg === null ? null : Math.abs(m.wdShiftDeg);
    case "ustarDecay":
      return m.ustarAfternoon !== null && m.ustarEvening !== null && m.ustarAfternoon > 0
        ? m.ustarEvening / m.ustarAfternoon
        : null;
    default:
      return m[name];
  }
}

/** Metrics of an evening without data: nothing measured, coverage zero (a fresh object each call). */
export function emptyMetrics(): EveningMetrics {
  return {
    sigmaWAfternoon: null,
    sigmaWTransition: null,
    sigmaWEvening: null,
    sigmaWDecay: null,
    ustarAfternoon: null,
    ustarEvening: null,
    windSpeedEvening: null,
    wdShiftDeg: null,
    sigmaThetaEvening: null,
    zetaEvening: null,
    hZeroCrossingMinutes: null,
    coolingRateKPerH: null,
    dewPointChangeK: null,
    coverage: { afternoon: 0, transition: 0, evening: 0 },
    derived: [],
  };
}

function fmt(v: number): string {
  return Math.abs(v) >= 10 ? v.toFixed(1) : v.toPrecision(3).replace(/\.?0+$/, "");
}

function isoSeconds(ms: number): string {
  return new Date(Math.round(ms / 1000) * 1000).toISOString().replace(".000Z", "Z");
}

/**
 * Labels every evening (local date on the data clock, relative to that evening's sunset) of a
 * half-hourly table. Evenings are listed when their windows overlap the table's time span (polar
 * days and nights when the local date does); an evening with too little data, or in polar day or
 * night, is "unclassified" with its reasons. Site-relative (percentile) thresholds are resolved over
 * the evenings of this table.
 */
export function classifyTable(table: HalfHourTable, site: SiteParams, rules: RuleSet = DEFAULT_RULE_SET): EveningResult[] {
  const problems = siteProblems(site);
  if (problems.length > 0) throw new Error(`site parameters: ${problems.join("; ")}`);
  const n = table.startMs.length;
  if (n === 0) return [];
  if (!(table.periodMinutes > 0)) throw new Error("table periodMinutes must be > 0");
  const p = prepareColumns(table, site);
  const spanStart = table.startMs[0] as number;
  const spanEnd = (table.startMs[n - 1] as number) + p.periodMs;
  const w = rules.windows;
  const first = Math.min(w.afternoon.startMinutes, w.transition.startMinutes, w.evening.startMinutes) * 60_000;
  const last = Math.max(w.afternoon.endMinutes, w.transition.endMinutes, w.evening.endMinutes) * 60_000;

  type Pending = {
    date: string;
    sunsetMs: number | null;
    duskMs: number | null;
    polar: string | null;
    shortDay: boolean;
    c: ComputedEvening | null;
  };
  const pending: Pending[] = [];
  const firstDate = localDateOf(spanStart - DAY_MS, site.utcOffsetHours);
  let midnight = localMidnightUtcMs(firstDate, site.utcOffsetHours);
  for (; midnight < spanEnd; midnight += DAY_MS) {
    const date = localDateOf(midnight, site.utcOffsetHours);
    const sun = cachedEveningSun(date, site);
    if (sun.sunsetMs === null) {
      if (midnight + DAY_MS > spanStart)
        pending.push({ date, sunsetMs: null, duskMs: null, polar: sun.status, shortDay: false, c: null });
      continue;
    }
    if (sun.sunsetMs + last <= spanStart || sun.sunsetMs + first >= spanEnd) continue;
    const shortDay =
      rules.requireDaylightAfternoon &&
      sun.sunriseMs !== null &&
      sun.sunriseMs > sun.sunsetMs + w.afternoon.startMinutes * 60_000;
    pending.push({
      date,
      sunsetMs: sun.sunsetMs,
      duskMs: sun.civilDuskMs,
      polar: null,
      shortDay,
      c: eveningMetrics(p, sun.sunsetMs, rules),
    });
  }

  const resolved = resolveThresholds(rules, pending.map((e) => e.c));
  const ctx: DecideContext = {
    rules,
    p,
    thresholds: Object.entries(rules.thresholds).map(([name, t]) => ({ name, t, value: resolved[name]?.value ?? Number.NaN })),
    notes: Object.values(resolved).flatMap((r) => (r.note ? [r.note] : [])),
  };
  return pending.map((e) => decide(e, ctx));
}

interface ResolvedThreshold {
  value: number;
  note: string | null;
}

function resolveThresholds(rules: RuleSet, evenings: Array<ComputedEvening | null>): Record<string, ResolvedThreshold> {
  const out: Record<string, ResolvedThreshold> = {};
  for (const [name, t] of Object.entries(rules.thresholds)) {
    if (t.kind === "absolute") {
      out[name] = { value: t.value, note: null };
      continue;
    }
    const values: number[] = [];
    for (const c of evenings) {
      if (!c || !coverageOk(c.metrics, rules)) continue;
      const v = metricValue(c.metrics, t.metric);
      if (v !== null && Number.isFinite(v)) values.push(v);
    }
    if (values.length < t.minEvenings) {
      out[name] = {
        value: t.fallback,
        note: `${name}: only ${values.length} evenings with ${t.metric} (< ${t.minEvenings}); fallback ${fmt(t.fallback)} used`,
      };
    } else {
      values.sort((a, b) => a - b);
      out[name] = {
        value: quantileSorted(values, t.percentile / 100),
        note: null,
      };
    }
  }
  return out;
}

function coverageOk(m: EveningMetrics, rules: RuleSet): boolean {
  const c = rules.minCoverage;
  return m.coverage.afternoon >= c.afternoon && m.coverage.transition >= c.transition && m.coverage.evening >= c.evening;
}

function describeCondition(t: Threshold, value: number, thr: number): string {
  const unit = UNIT[t.metric] ? ` ${UNIT[t.metric]}` : "";
  return `${t.metric} ${fmt(value)} ${t.op === "below" ? "<" : ">"} ${fmt(thr)}${unit}`;
}

interface DecideContext {
  rules: RuleSet;
  p: PreparedColumns;
  thresholds: Array<{ name: string; t: Threshold; value: number }>;
  notes: string[];
}

function decide(
  e: {
    date: string;
    sunsetMs: number | null;
    duskMs: number | null;
    polar: string | null;
    shortDay: boolean;
    c: ComputedEvening | null;
  },
  ctx: DecideContext,
): EveningResult {
  const { date, sunsetMs, duskMs, polar, c } = e;
  const rules = ctx.rules;
  const base = {
    date,
    sunsetUtc: sunsetMs === null ? null : isoSeconds(sunsetMs),
    civilDuskUtc: duskMs === null ? null : isoSeconds(duskMs),
  };
  if (polar !== null || c === null) {
    const why = polar === "polar-day" ? "polar day: the Sun does not set" : "polar night: the Sun does not rise";
    return {
      ...base,
      label: "unclassified",
      rule: null,
      reasons: [why],
      margins: {},
      metrics: emptyMetrics(),
    };
  }
  const m = c.metrics;
  const reasons = ctx.notes;

  const lacking: string[] = [];
  for (const win of ["afternoon", "transition", "evening"] as const) {
    const need = rules.minCoverage[win];
    const have = m.coverage[win];
    if (have < need) {
      const vars = Object.entries(variableCoverage(ctx.p, c.rows[win]))
        .filter(([, v]) => v < need)
        .map(([k, v]) => `${k} ${fmt(v)}`);
      lacking.push(
        `coverage of ${win} window ${fmt(have)} < ${fmt(need)}${vars.length ? ` (${vars.join(", ")})` : ""}`,
      );
    }
  }

  const margins: Record<string, number> = {};
  const thrOf: Record<string, number> = {};
  for (const { name, t, value: thr } of ctx.thresholds) {
    thrOf[name] = thr;
    const v = metricValue(m, t.metric);
    if (v === null || !Number.isFinite(v) || !Number.isFinite(thr)) continue;
    margins[name] = t.op === "below" ? thr - v : v - thr;
  }

  if (e.shortDay) {
    lacking.push("short day: the afternoon window starts before sunrise, so there is no daytime reference");
  }
  if (lacking.length > 0) {
    return { ...base, label: "unclassified", rule: null, reasons: [...lacking, ...reasons], margins, metrics: m };
  }

  const skipped: string[] = [];
  for (const rule of rules.rules) {
    let ok = true;
    const because: string[] = [];
    for (const name of rule.all) {
      const t = rules.thresholds[name] as Threshold;
      const margin = margins[name];
      if (margin === undefined) {
        ok = false;
        skipped.push(`${rule.id}: ${t.metric} not available`);
        break;
      }
      if (!(margin > 0)) {
        ok = false;
        break;
      }
      because.push(describeCondition(t, metricValue(m, t.metric) as number, thrOf[name] as number));
    }
    if (!ok) continue;
    for (const name of rule.optional) {
      const t = rules.thresholds[name] as Threshold;
      const margin = margins[name];
      if (margin === undefined) {
        because.push(`${t.metric} not available, not checked`);
        continue;
      }
      if (!(margin > 0)) {
        ok = false;
        break;
      }
      because.push(describeCondition(t, metricValue(m, t.metric) as number, thrOf[name] as number));
    }
    if (!ok) continue;
    return {
      ...base,
      label: rule.label,
      rule: rule.id,
      reasons: [`${rule.id}: ${rule.description}`, ...because, ...reasons],
      margins,
      metrics: m,
    };
  }
  return {
    ...base,
    label: "unclassified",
    rule: null,
    reasons: ["no rule matched: the evening is ambiguous under this rule set", ...skipped, ...reasons],
    margins,
    metrics: m,
  };
}
