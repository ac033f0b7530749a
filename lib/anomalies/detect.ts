import type { ResolvedAnomalySettings } from "@/lib/anomalies/settings";

/**
 * Robust screening of concentration and flux series around each evening.
 *
 * For every half-hour of the screened window (default S-1 h to S+3 h, S = sunset) the baseline is
 * the median of the same half-hour of day over a moving window of days around the evening, the
 * evening's own day left out, and the scale is the MAD, so the score is the modified z of
 * Iglewicz & Hoaglin (1993), M = 0.6745 (x - median) / MAD = (x - median) / (1.4826 MAD).
 * A run of at least `minConsecutive` half-hours beyond `threshold` with one sign is an anomaly:
 * a rise (after sunset when the run reaches sunset, else before it) or a drop. A single
 * half-hour beyond the higher `spikeScore` is a spike. Where the MAD is 0 (a constant baseline)
 * no score is given rather than an infinite one.
 */

export const ANOMALY_KINDS = ["rise-after-sunset", "rise-before-sunset", "drop", "spike"] as const;
export type AnomalyKind = (typeof ANOMALY_KINDS)[number];

/** The factor that makes the MAD a consistent estimate of a normal standard deviation. */
export const MAD_TO_SD = 1.4826;

/** One series to screen, aligned with the table's startMs; NaN = missing. */
export interface SeriesInput {
  name: string;
  values: Float64Array;
}

/** An evening to screen: its local date and sunset (UTC epoch ms; null in polar day or night). */
export interface EveningRef {
  date: string;
  sunsetMs: number | null;
}

export interface DetectedAnomaly {
  series: string;
  kind: AnomalyKind;
  /** index into the evenings passed in */
  eveningIndex: number;
  date: string;
  /** UTC epoch ms of the start of the first anomalous period */
  startMs: number;
  /** UTC epoch ms of the end of the last anomalous period */
  endMs: number;
  /** the score of largest magnitude in the run, signed */
  peakScore: number;
  /** the value and its baseline median at the peak, in the series' unit */
  peakValue: number;
  baselineValue: number;
  periods: number;
}

/** Score of one period of an evening's window. */
export interface PeriodScore {
  startMs: number;
  value: number;
  /** baseline median, series unit; NaN without enough baseline days */
  baseline: number;
  /** 1.4826 MAD, series unit */
  scale: number;
  /** modified z; NaN when value, baseline or a non-zero MAD is missing */
  score: number;
}

const DAY_MS = 86_400_000;

/**
 * The series laid out on a regular grid of whole UTC days, so "the same half-hour on day d+k"
 * is an index step of k * perDay. Rows off the period grid snap to the nearest period.
 */
export class DayGrid {
  readonly originMs: number;
  readonly periodMs: number;
  readonly perDay: number;
  readonly days: number;
  readonly series: ReadonlyArray<{ name: string; grid: Float64Array }>;

  constructor(startMs: Float64Array, periodMinutes: number, series: readonly SeriesInput[]) {
    this.periodMs = periodMinutes * 60_000;
    this.perDay = DAY_MS / this.periodMs;
    if (!Number.isInteger(this.perDay))
      throw new Error(`a day is not a whole number of ${periodMinutes}-minute periods`);
    const first = startMs.length > 0 ? (startMs[0] as number) : 0;
    const last = startMs.length > 0 ? (startMs[startMs.length - 1] as number) : 0;
    const dayStart = Math.floor(first / DAY_MS) * DAY_MS;
    this.originMs = dayStart + ((((first - dayStart) % this.periodMs) + this.periodMs) % this.periodMs);
    this.days = startMs.length === 0 ? 0 : Math.floor((last - this.originMs) / DAY_MS) + 1;
    const size = this.days * this.perDay;
    const index = new Int32Array(startMs.length);
    for (let i = 0; i < startMs.length; i++)
      index[i] = Math.round(((startMs[i] as number) - this.originMs) / this.periodMs);
    this.series = series.map((s) => {
      if (s.values.length !== startMs.length)
        throw new Error(`series ${s.name}: ${s.values.length} values for ${startMs.length} periods`);
      const grid = new Float64Array(size).fill(Number.NaN);
      for (let i = 0; i < index.length; i++) {
        const p = index[i] as number;
        if (p >= 0 && p < size) grid[p] = s.values[i] as number;
      }
      return { name: s.name, grid };
    });
  }

  /** Grid periods whose midpoint lies in [fromMs, toMs), as [first, end). */
  periodsBetween(fromMs: number, toMs: number): [number, number] {
    const half = this.periodMs / 2;
    const a = Math.max(0, Math.ceil((fromMs - this.originMs - half) / this.periodMs));
    const b = Math.min(this.days * this.perDay, Math.ceil((toMs - this.originMs - half) / this.periodMs));
    return [a, Math.max(a, b)];
  }

  startOf(p: number): number {
    return this.originMs + p * this.periodMs;
  }
}

/**
 * Baseline and modified z for period `p` of series `s`: the same half-hour of day on the days
 * within `halfWidthDays` of p's day, p's own day left out.
 */
export function scorePeriod(
  grid: DayGrid,
  s: number,
  p: number,
  halfWidthDays: number,
  minBaselineDays: number,
  scratch: Float64Array = new Float64Array(2 * halfWidthDays),
): PeriodScore {
  const values = (grid.series[s] as { grid: Float64Array }).grid;
  const day = Math.floor(p / grid.perDay);
  let n = 0;
  for (let k = -halfWidthDays; k <= halfWidthDays; k++) {
    const d = day + k;
    if (k === 0 || d < 0 || d >= grid.days) continue;
    const v = values[p + k * grid.perDay] as number;
    if (Number.isFinite(v)) scratch[n++] = v;
  }
  const value = values[p] as number;
  if (n < minBaselineDays)
    return { startMs: grid.startOf(p), value, baseline: Number.NaN, scale: Number.NaN, score: Number.NaN };
  const { med, mad: m } = medianAndMad(scratch, n);
  const score = Number.isFinite(value) && m > 0 ? modifiedZScore(value, med, m) : Number.NaN;
  return { startMs: grid.startOf(p), value, baseline: med, scale: MAD_TO_SD * m, score };
}

/**
 * Median and unscaled MAD of the first n values of `buf` (reordered in place). The same figures
 * as lib/physics/robust median() and mad(), with native typed-array sorts and no allocation:
 * the screen computes them for every half-hour of every evening.
 */
export function medianAndMad(buf: Float64Array, n: number): { med: number; mad: number } {
  if (n === 0) return { med: Number.NaN, mad: Number.NaN };
  const a = buf.subarray(0, n).sort();
  const mid = n >> 1;
  const med = n % 2 === 1 ? (a[mid] as number) : ((a[mid - 1] as number) + (a[mid] as number)) / 2;
  for (let i = 0; i < n; i++) a[i] = Math.abs((a[i] as number) - med);
  a.sort();
  const mad = n % 2 === 1 ? (a[mid] as number) : ((a[mid - 1] as number) + (a[mid] as number)) / 2;
  return { med, mad };
}

/**
 * Modified z-score (Iglewicz & Hoaglin 1993): 0.6745 (x - median) / MAD, dimensionless.
 * @param x value
 * @param med median of the reference sample, unit of x
 * @param madValue unscaled median absolute deviation of the sample, unit of x
 */
export function modifiedZScore(x: number, med: number, madValue: number): number {
  return (0.6745 * (x - med)) / madValue;
}

/** Scores of every period in an evening's screened window, for charts and for detection. */
export function eveningScores(
  grid: DayGrid,
  s: number,
  sunsetMs: number,
  settings: ResolvedAnomalySettings,
): PeriodScore[] {
  const [a, b] = grid.periodsBetween(
    sunsetMs + settings.window.startMinutes * 60_000,
    sunsetMs + settings.window.endMinutes * 60_000,
  );
  const scratch = new Float64Array(2 * settings.baselineHalfWidthDays);
  const out: PeriodScore[] = [];
  for (let p = a; p < b; p++)
    out.push(scorePeriod(grid, s, p, settings.baselineHalfWidthDays, settings.minBaselineDays, scratch));
  return out;
}

/**
 * Finds rises, drops and spikes of every series around every evening with a sunset.
 * Evenings without a sunset (polar day or night) are skipped.
 *
 * @param startMs UTC epoch ms of period starts, increasing
 * @param periodMinutes averaging period, minutes
 */
export function detectAnomalies(
  startMs: Float64Array,
  periodMinutes: number,
  series: readonly SeriesInput[],
  evenings: readonly EveningRef[],
  settings: ResolvedAnomalySettings,
): DetectedAnomaly[] {
  const grid = new DayGrid(startMs, periodMinutes, series);
  return detectOnGrid(grid, evenings, settings);
}

/** detectAnomalies on a grid built once (the job screens several ranges of one site). */
export function detectOnGrid(
  grid: DayGrid,
  evenings: readonly EveningRef[],
  settings: ResolvedAnomalySettings,
): DetectedAnomaly[] {
  const out: DetectedAnomaly[] = [];
  const half = grid.periodMs / 2;
  evenings.forEach((ev, e) => {
    if (ev.sunsetMs === null) return;
    const sunset = ev.sunsetMs;
    grid.series.forEach((ser, s) => {
      const scores = eveningScores(grid, s, sunset, settings);
      let runStart = -1;
      let sign = 0;
      const flush = (end: number) => {
        if (runStart < 0) return;
        const run = scores.slice(runStart, end);
        let peak = run[0] as PeriodScore;
        for (const r of run) if (Math.abs(r.score) > Math.abs(peak.score)) peak = r;
        const first = run[0] as PeriodScore;
        const last = run[run.length - 1] as PeriodScore;
        let kind: AnomalyKind | null = null;
        if (run.length >= settings.minConsecutive) {
          if (sign < 0) kind = "drop";
          else kind = last.startMs + half >= sunset ? "rise-after-sunset" : "rise-before-sunset";
        } else if (Math.abs(peak.score) >= settings.spikeScore) {
          kind = "spike";
        }
        if (kind)
          out.push({
            series: ser.name,
            kind,
            eveningIndex: e,
            date: ev.date,
            startMs: first.startMs,
            endMs: last.startMs + grid.periodMs,
            peakScore: peak.score,
            peakValue: peak.value,
            baselineValue: peak.baseline,
            periods: run.length,
          });
        runStart = -1;
        sign = 0;
      };
      scores.forEach((r, i) => {
        const beyond = Math.abs(r.score) > settings.threshold;
        const sg = beyond ? Math.sign(r.score) : 0;
        if (sg !== sign) flush(i);
        if (beyond && runStart < 0) {
          runStart = i;
          sign = sg;
        }
      });
      flush(scores.length);
    });
  });
  return out;
}
