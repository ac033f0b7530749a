import "server-only";
import { DEFAULT_RULE_SET, type RuleSet } from "@/lib/classify/rules";
import { db } from "@/lib/db/knex";
import type { EveningLabel, InsertRow, UstarThresholdRow } from "@/lib/db/tables";
import { DayGrid, detectOnGrid, type EveningRef, type SeriesInput } from "@/lib/anomalies/detect";
import { anomalySettingsOf } from "@/lib/anomalies/settings";
import { loadHalfHours, listSiteSeries } from "@/lib/evenings/load";
import { getActiveRuleSet } from "@/lib/evenings/rulesets";
import { weakTurbulenceByEvening } from "@/lib/ustar/flags";
import { nightMask } from "@/lib/ustar/night";
import { seasonOfDate } from "@/lib/ustar/seasons";
import { ustarThresholds, type ThresholdUncertainty } from "@/lib/ustar/threshold";

/*
 * The anomaly job's work for one site and a range of evenings: screen every mapped
 * concentration and flux series around each evening, estimate the u* thresholds of the
 * season-years the range touches, flag weak-turbulence nights, and replace what was stored
 * for that range in one transaction.
 */

export interface DetectionProgress {
  phase: string;
  done: number;
  total: number;
}

export interface DetectionResult {
  evenings: number;
  series: string[];
  anomalies: number;
  weakTurbulenceEvenings: number;
  thresholds: number;
  ruleSetVersion: number | null;
}

type EveningRow = {
  id: number;
  local_date: string;
  sunset_utc: Date | null;
  final_label: EveningLabel;
};

const DAY_MS = 86_400_000;
const FLUX_SERIES = "FC";
const BATCH = 1000;

/** First and last local dates (YYYY-MM-DD) of the season-years that contain the given dates. */
function seasonYearSpan(from: string, to: string, latitudeDeg: number): { from: string; to: string } {
  const a = seasonOfDate(from, latitudeDeg).seasonYear;
  const b = seasonOfDate(to, latitudeDeg).seasonYear;
  return { from: `${a - 1}-12-01`, to: `${b}-11-30` };
}

function chunks<T>(rows: T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < rows.length; i += size) out.push(rows.slice(i, i + size));
  return out;
}

/**
 * Runs the screen for the evenings of `siteId` with local dates in [from, to] (all evenings when
 * both are null) and stores anomalies, u* thresholds and weak-turbulence flags.
 */
export async function runAnomalyDetection(
  siteId: number,
  range: { from: string | null; to: string | null },
  onProgress: (p: DetectionProgress) => Promise<void> = async () => {},
  ruleSetOverride?: RuleSet,
): Promise<DetectionResult> {
  const site = await db("sites").where({ id: siteId }).first("latitude", "longitude", "utc_offset_hours");
  if (!site) throw new Error(`site ${siteId} does not exist`);
  const offsetHours = Number(site.utc_offset_hours);
  const stored = ruleSetOverride ? null : await getActiveRuleSet(siteId);
  const ruleSet = ruleSetOverride ?? stored?.definition ?? DEFAULT_RULE_SET;
  const settings = anomalySettingsOf(ruleSet);

  const q = db("evenings")
    .where({ site_id: siteId })
    .select<EveningRow[]>(
      "id",
      db.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS local_date"),
      "sunset_utc",
      "final_label",
    )
    .orderBy("local_date");
  if (range.from) q.andWhere("local_date", ">=", range.from);
  if (range.to) q.andWhere("local_date", "<=", range.to);
  const evenings = await q;
  const empty: DetectionResult = {
    evenings: 0,
    series: [],
    anomalies: 0,
    weakTurbulenceEvenings: 0,
    thresholds: 0,
    ruleSetVersion: stored?.version ?? null,
  };
  if (evenings.length === 0) return empty;
  const firstDate = (evenings[0] as EveningRow).local_date;
  const lastDate = (evenings[evenings.length - 1] as EveningRow).local_date;

  // one read covers the baseline margins and the whole season-years of the u* estimate
  const span = seasonYearSpan(firstDate, lastDate, site.latitude);
  const marginMs = (settings.baselineHalfWidthDays + 2) * DAY_MS;
  const localMs = (d: string) => Date.parse(`${d}T00:00:00Z`) - offsetHours * 3_600_000;
  const fromMs = Math.min(localMs(firstDate) - marginMs, localMs(span.from));
  const toMs = Math.max(localMs(lastDate) + DAY_MS + marginMs, localMs(span.to) + DAY_MS);
  await onProgress({ phase: "loading", done: 0, total: evenings.length });
  const table = await loadHalfHours(siteId, fromMs, toMs);
  const mapped = await listSiteSeries(siteId);

  const names = ["CO2", FLUX_SERIES, ...mapped.map((s) => s.name)].filter(
    (n, i, all) => all.indexOf(n) === i,
  );
  const series: SeriesInput[] = names.flatMap((name) => {
    const values = table.columns[name];
    return values ? [{ name, values }] : [];
  });
  const refs: EveningRef[] = evenings.map((e) => ({
    date: e.local_date,
    sunsetMs: e.sunset_utc ? e.sunset_utc.getTime() : null,
  }));

  await onProgress({ phase: "screening", done: 0, total: evenings.length });
  const found =
    table.startMs.length > 0 && series.length > 0
      ? detectOnGrid(new DayGrid(table.startMs, table.periodMinutes, series), refs, settings)
      : [];

  await onProgress({ phase: "u* threshold", done: 0, total: evenings.length });
  const ustar = table.columns.USTAR;
  const flux = table.columns[FLUX_SERIES];
  const ta = table.columns.TA;
  let thresholdRows: Array<InsertRow<"ustar_thresholds">> = [];
  let weakRows: Array<InsertRow<"weak_turbulence">> = [];
  if (ustar && flux && ta) {
    const night = nightMask(
      table.startMs,
      table.periodMinutes,
      table.columns.SW_IN,
      site.latitude,
      site.longitude,
      settings.ustar.nightSwInMax,
    );
    const u = ustarThresholds(
      {
        startMs: table.startMs,
        ustar,
        flux,
        ta,
        night,
        utcOffsetHours: offsetHours,
        latitudeDeg: site.latitude,
      },
      settings.ustar,
    );
    const annual = new Map(u.annual.map((a) => [a.seasonYear, a.thresholdMs]));
    const rowOf = (
      seasonYear: number,
      season: UstarThresholdRow["season"],
      thresholdMs: number | null,
      unc: ThresholdUncertainty,
      points: number,
      used: number,
    ) => ({
      site_id: siteId,
      season_year: seasonYear,
      season,
      flux_series: FLUX_SERIES,
      threshold_ms: thresholdMs,
      points,
      temperature_classes_used: used,
      bootstrap_resamples: unc.resamples,
      bootstrap_found: unc.found,
      p05_ms: unc.p05,
      p50_ms: unc.p50,
      p95_ms: unc.p95,
      sd_ms: unc.sd,
    });
    thresholdRows = [
      ...u.seasons.map((s) =>
        rowOf(s.seasonYear, s.season, s.thresholdMs, s.uncertainty, s.points, s.temperatureClassesUsed),
      ),
      ...u.annual.map((a) => {
        const pts = u.seasons.filter((s) => s.seasonYear === a.seasonYear).reduce((n, s) => n + s.points, 0);
        return rowOf(a.seasonYear, "year", a.thresholdMs, a.uncertainty, pts, 0);
      }),
    ];
    const flags = weakTurbulenceByEvening(
      table.startMs,
      ustar,
      flux,
      night,
      refs.map((r) => r.sunsetMs),
      (ms) =>
        annual.get(
          seasonOfDate(new Date(ms + offsetHours * 3_600_000).toISOString().slice(0, 10), site.latitude)
            .seasonYear,
        ) ?? null,
    );
    weakRows = flags.map((f) => ({
      evening_id: (evenings[f.eveningIndex] as EveningRow).id,
      site_id: siteId,
      flux_series: FLUX_SERIES,
      threshold_ms: f.thresholdMs,
      night_periods: f.nightPeriods,
      weak_periods: f.weakPeriods,
      first_weak_utc: f.firstWeakMs === null ? null : new Date(f.firstWeakMs),
      last_weak_utc: f.lastWeakMs === null ? null : new Date(f.lastWeakMs),
    }));
  }

  const anomalyRows = found.map((a) => {
    const ev = evenings[a.eveningIndex] as EveningRow;
    return {
      site_id: siteId,
      evening_id: ev.id,
      series: a.series,
      kind: a.kind,
      start_utc: new Date(a.startMs),
      end_utc: new Date(a.endMs),
      peak_score: a.peakScore,
      peak_value: Number.isFinite(a.peakValue) ? a.peakValue : null,
      baseline_value: Number.isFinite(a.baselineValue) ? a.baselineValue : null,
      periods: a.periods,
      label_at_detection: ev.final_label,
      rule_set_version: stored?.version ?? null,
    };
  });

  await onProgress({ phase: "saving", done: 0, total: evenings.length });
  const ids = evenings.map((e) => e.id);
  const seasonYears = [...new Set(thresholdRows.map((r) => r.season_year as number))];
  await db.transaction(async (trx) => {
    for (const part of chunks(ids, BATCH)) {
      await trx("anomalies").where({ site_id: siteId }).whereIn("evening_id", part).delete();
      await trx("weak_turbulence").where({ site_id: siteId }).whereIn("evening_id", part).delete();
    }
    if (seasonYears.length > 0)
      await trx("ustar_thresholds").where({ site_id: siteId }).whereIn("season_year", seasonYears).delete();
    for (const part of chunks(anomalyRows, BATCH)) await trx("anomalies").insert(part);
    for (const part of chunks(weakRows, BATCH)) await trx("weak_turbulence").insert(part);
    for (const part of chunks(thresholdRows, BATCH)) await trx("ustar_thresholds").insert(part);
  });
  await onProgress({ phase: "done", done: evenings.length, total: evenings.length });
  return {
    evenings: evenings.length,
    series: series.map((s) => s.name),
    anomalies: anomalyRows.length,
    weakTurbulenceEvenings: weakRows.filter((r) => (r.weak_periods as number) > 0).length,
    thresholds: thresholdRows.length,
    ruleSetVersion: stored?.version ?? null,
  };
}
