import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";
import type { AnomalyKind } from "@/lib/anomalies/detect";
import type { Label } from "@/lib/classify/evenings";
import { monthsOfSeason, type Season } from "@/lib/ustar/seasons";
import type { ThresholdUncertainty } from "@/lib/ustar/threshold";
import type { AnomalyRow } from "@/lib/db/tables";

/*
 * Reads of stored anomalies, u* thresholds and weak-turbulence flags. Every row carries the
 * evening's CURRENT final label (joined, never copied), so flags follow reclassification and
 * overrides. Callers check access to the site first; these functions take ids they trust.
 */

export interface StoredAnomaly {
  id: number;
  series: string;
  kind: AnomalyKind;
  /** ISO 8601 UTC, start of the first and end of the last anomalous period */
  start: string;
  end: string;
  peakScore: number;
  peakValue: number | null;
  baselineValue: number | null;
  periods: number;
  eveningId: number;
  eveningDate: string;
  /** the evening's final label now */
  label: Label;
  labelSource: "auto" | "override";
  labelAtDetection: Label | null;
}

export interface AnomalyFilters {
  /** local dates YYYY-MM-DD, inclusive */
  from?: string | null;
  to?: string | null;
  series?: string | null;
  kind?: AnomalyKind | null;
  label?: Label | null;
  season?: Season | null;
}

// An anomaly row with its evening's date and final label joined in.
type Row = Omit<AnomalyRow, "site_id" | "rule_set_version" | "detected_at"> & {
  evening_date: string;
  final_label: Label;
  label_source: "auto" | "override";
};

const toAnomaly = (r: Row): StoredAnomaly => ({
  id: Number(r.id),
  series: r.series,
  kind: r.kind,
  start: r.start_utc.toISOString(),
  end: r.end_utc.toISOString(),
  peakScore: r.peak_score,
  peakValue: r.peak_value,
  baselineValue: r.baseline_value,
  periods: r.periods,
  eveningId: Number(r.evening_id),
  eveningDate: r.evening_date,
  label: r.final_label,
  labelSource: r.label_source,
  labelAtDetection: r.label_at_detection,
});

const ANOMALY_COLUMNS = [
  "a.id",
  "a.series",
  "a.kind",
  "a.start_utc",
  "a.end_utc",
  "a.peak_score",
  "a.peak_value",
  "a.baseline_value",
  "a.periods",
  "a.evening_id",
  db.raw("DATE_FORMAT(e.local_date, '%Y-%m-%d') AS evening_date"),
  "e.final_label",
  "e.label_source",
  "a.label_at_detection",
];

async function latitudeOf(siteId: number): Promise<number> {
  const row = await db("sites").where({ id: siteId }).first("latitude");
  return row?.latitude ?? 0;
}

/** Local months 1..12 of a season at a site (seasons flip south of the equator). */
async function seasonMonths(siteId: number, season: Season | null | undefined): Promise<number[] | null> {
  if (!season) return null;
  return monthsOfSeason(season, await latitudeOf(siteId)).map((m) => m + 1);
}

// Knex builders are thenables: they are built synchronously and never returned from an async
// function, which would run them.
function eveningFilters(q: Knex.QueryBuilder, f: AnomalyFilters, months: number[] | null): Knex.QueryBuilder {
  if (f.from) q.andWhere("e.local_date", ">=", f.from);
  if (f.to) q.andWhere("e.local_date", "<=", f.to);
  if (f.label) q.andWhere("e.final_label", f.label);
  if (months) q.whereRaw(`MONTH(e.local_date) IN (${months.map(() => "?").join(",")})`, months);
  return q;
}

function filtered(siteId: number, f: AnomalyFilters, months: number[] | null): Knex.QueryBuilder {
  const q = db("anomalies as a").join("evenings as e", "e.id", "a.evening_id").where("a.site_id", siteId);
  if (f.series) q.andWhere("a.series", f.series);
  if (f.kind) q.andWhere("a.kind", f.kind);
  return eveningFilters(q, f, months);
}

/** Anomalies of a site, newest evening first, with the total count for paging. */
export async function listAnomalies(
  siteId: number,
  filters: AnomalyFilters = {},
  page: { limit?: number; offset?: number } = {},
): Promise<{ anomalies: StoredAnomaly[]; total: number }> {
  const base = filtered(siteId, filters, await seasonMonths(siteId, filters.season));
  const [count] = await base.clone().count<Array<{ n: number | string }>>({ n: "*" });
  const rows = (await base
    .clone()
    .select(ANOMALY_COLUMNS)
    .orderBy([
      { column: "e.local_date", order: "desc" },
      { column: "a.start_utc", order: "asc" },
      { column: "a.series", order: "asc" },
    ])
    .limit(page.limit ?? 200)
    .offset(page.offset ?? 0)) as Row[];
  return { anomalies: rows.map(toAnomaly), total: Number(count?.n ?? 0) };
}

/** Every anomaly of a site in a local-date range, oldest first (for the JSON API and exports). */
export async function anomaliesInRange(
  siteId: number,
  from: string | null,
  to: string | null,
): Promise<StoredAnomaly[]> {
  const q = filtered(siteId, { from, to }, null);
  const rows = (await q.select(ANOMALY_COLUMNS).orderBy([
    { column: "a.start_utc", order: "asc" },
    { column: "a.series", order: "asc" },
  ])) as Row[];
  return rows.map(toAnomaly);
}

/** Counts by series, kind and current final label, e.g. post-sunset rises on stagnant evenings. */
export async function anomalyCountsByLabel(
  siteId: number,
  filters: AnomalyFilters = {},
): Promise<Array<{ series: string; kind: AnomalyKind; label: Label; count: number }>> {
  const q = filtered(siteId, filters, await seasonMonths(siteId, filters.season));
  const rows = (await q
    .select("a.series", "a.kind", "e.final_label")
    .count({ n: "*" })
    .groupBy("a.series", "a.kind", "e.final_label")
    .orderBy(["a.series", "a.kind", "e.final_label"])) as Array<{
    series: string;
    kind: AnomalyKind;
    final_label: Label;
    n: number | string;
  }>;
  return rows.map((r) => ({ series: r.series, kind: r.kind, label: r.final_label, count: Number(r.n) }));
}

/** Local dates with anomalies in [from, to], for calendar markers. */
export async function anomalyDatesForSite(
  siteId: number,
  from: string,
  to: string,
): Promise<Array<{ date: string; count: number; kinds: AnomalyKind[]; series: string[] }>> {
  const rows = (await db("anomalies as a")
    .join("evenings as e", "e.id", "a.evening_id")
    .where("a.site_id", siteId)
    .andWhere("e.local_date", ">=", from)
    .andWhere("e.local_date", "<=", to)
    .select(db.raw("DATE_FORMAT(e.local_date, '%Y-%m-%d') AS date"), "a.kind", "a.series")
    .orderBy("e.local_date")) as Array<{ date: string; kind: AnomalyKind; series: string }>;
  const byDate = new Map<string, { date: string; count: number; kinds: AnomalyKind[]; series: string[] }>();
  for (const r of rows) {
    let d = byDate.get(r.date);
    if (!d) byDate.set(r.date, (d = { date: r.date, count: 0, kinds: [], series: [] }));
    d.count++;
    if (!d.kinds.includes(r.kind)) d.kinds.push(r.kind);
    if (!d.series.includes(r.series)) d.series.push(r.series);
  }
  return [...byDate.values()];
}

/** The anomalies of one evening, by start, for chart overlays and the review queue. */
export async function anomaliesForEvening(eveningId: number): Promise<StoredAnomaly[]> {
  const rows = (await db("anomalies as a")
    .join("evenings as e", "e.id", "a.evening_id")
    .where("a.evening_id", eveningId)
    .select(ANOMALY_COLUMNS)
    .orderBy(["a.start_utc", "a.series"])) as Row[];
  return rows.map(toAnomaly);
}

/** Evening ids of a site with at least one anomaly (to feed the review queue). */
export async function eveningIdsWithAnomalies(siteId: number, from?: string, to?: string): Promise<number[]> {
  const q = db("anomalies as a").join("evenings as e", "e.id", "a.evening_id").where("a.site_id", siteId);
  if (from) q.andWhere("e.local_date", ">=", from);
  if (to) q.andWhere("e.local_date", "<=", to);
  const rows = await q.distinct<Array<{ evening_id: number }>>("a.evening_id");
  return rows.map((r) => Number(r.evening_id));
}

/** Series names with stored anomalies at a site (for filters). */
export async function anomalySeriesOfSite(siteId: number): Promise<string[]> {
  const rows = (await db("anomalies")
    .where({ site_id: siteId })
    .distinct("series")
    .orderBy("series")) as Array<{
    series: string;
  }>;
  return rows.map((r) => r.series);
}

export interface StoredThreshold {
  seasonYear: number;
  season: Season | "year";
  fluxSeries: string;
  thresholdMs: number | null;
  points: number;
  temperatureClassesUsed: number;
  bootstrap: ThresholdUncertainty;
  computedAt: string;
}

/** u* thresholds of a site per season-year and season ("year" = the annual maximum applied). */
export async function ustarThresholdsForSite(siteId: number): Promise<StoredThreshold[]> {
  const rows = await db("ustar_thresholds")
    .where({ site_id: siteId })
    .orderBy("season_year")
    .orderByRaw("FIELD(season, 'winter', 'spring', 'summer', 'autumn', 'year')");
  return rows.map((r) => ({
    seasonYear: r.season_year,
    season: r.season,
    fluxSeries: r.flux_series,
    thresholdMs: r.threshold_ms,
    points: r.points,
    temperatureClassesUsed: r.temperature_classes_used,
    bootstrap: {
      resamples: r.bootstrap_resamples,
      found: r.bootstrap_found,
      p05: r.p05_ms,
      p50: r.p50_ms,
      p95: r.p95_ms,
      sd: r.sd_ms,
    },
    computedAt: r.computed_at.toISOString(),
  }));
}

export interface WeakTurbulenceEvening {
  eveningId: number;
  eveningDate: string;
  label: Label;
  fluxSeries: string;
  thresholdMs: number;
  nightPeriods: number;
  weakPeriods: number;
  firstWeak: string | null;
  lastWeak: string | null;
}

type WeakRow = {
  evening_id: number;
  evening_date: string;
  final_label: Label;
  flux_series: string;
  threshold_ms: number;
  night_periods: number;
  weak_periods: number;
  first_weak_utc: Date | null;
  last_weak_utc: Date | null;
};

const toWeak = (r: WeakRow): WeakTurbulenceEvening => ({
  eveningId: Number(r.evening_id),
  eveningDate: r.evening_date,
  label: r.final_label,
  fluxSeries: r.flux_series,
  thresholdMs: r.threshold_ms,
  nightPeriods: r.night_periods,
  weakPeriods: r.weak_periods,
  firstWeak: r.first_weak_utc?.toISOString() ?? null,
  lastWeak: r.last_weak_utc?.toISOString() ?? null,
});

const WEAK_COLUMNS = [
  "w.evening_id",
  db.raw("DATE_FORMAT(e.local_date, '%Y-%m-%d') AS evening_date"),
  "e.final_label",
  "w.flux_series",
  "w.threshold_ms",
  "w.night_periods",
  "w.weak_periods",
  "w.first_weak_utc",
  "w.last_weak_utc",
];

/** Evenings whose night had flux periods under weak turbulence, newest first, with counts by label. */
export async function weakTurbulenceForSite(
  siteId: number,
  filters: Omit<AnomalyFilters, "series" | "kind"> = {},
  page: { limit?: number; offset?: number } = {},
): Promise<{
  evenings: WeakTurbulenceEvening[];
  total: number;
  byLabel: Array<{ label: Label; evenings: number; weakPeriods: number; nightPeriods: number }>;
}> {
  const months = await seasonMonths(siteId, filters.season);
  const base = eveningFilters(
    db("weak_turbulence as w").join("evenings as e", "e.id", "w.evening_id").where("w.site_id", siteId),
    filters,
    months,
  );
  const byLabelRows = (await base
    .clone()
    .select("e.final_label")
    .count({ n: "*" })
    .sum({ weak: "w.weak_periods", night: "w.night_periods" })
    .where("w.weak_periods", ">", 0)
    .groupBy("e.final_label")
    .orderBy("e.final_label")) as Array<{
    final_label: Label;
    n: number | string;
    weak: number | string;
    night: number | string;
  }>;
  const weakOnly = base.clone().where("w.weak_periods", ">", 0);
  const [count] = await weakOnly.clone().count<Array<{ n: number | string }>>({ n: "*" });
  const rows = (await weakOnly
    .select(WEAK_COLUMNS)
    .orderBy("e.local_date", "desc")
    .limit(page.limit ?? 200)
    .offset(page.offset ?? 0)) as WeakRow[];
  return {
    evenings: rows.map(toWeak),
    total: Number(count?.n ?? 0),
    byLabel: byLabelRows.map((r) => ({
      label: r.final_label,
      evenings: Number(r.n),
      weakPeriods: Number(r.weak),
      nightPeriods: Number(r.night),
    })),
  };
}

/** The weak-turbulence flag of one evening's night, or null when none was computed. */
export async function weakTurbulenceForEvening(eveningId: number): Promise<WeakTurbulenceEvening | null> {
  const row = await db("weak_turbulence as w")
    .join("evenings as e", "e.id", "w.evening_id")
    .where("w.evening_id", eveningId)
    .first<WeakRow | undefined>(WEAK_COLUMNS);
  return row ? toWeak(row) : null;
}
