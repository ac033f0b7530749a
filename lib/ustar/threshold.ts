import { quantileSorted } from "simple-statistics";
import { median } from "@/lib/physics/robust";
import { SEASONS, seasonOfMonth, type Season } from "@/lib/ustar/seasons";

/**
 * Friction-velocity (u*) threshold for nighttime flux filtering by the moving-point method
 * (Reichstein et al. 2005, Papale et al. 2006; details marked "from memory" were not re-read):
 *
 * - nighttime periods with u*, flux and air temperature are split by season (season-year);
 * - each season into `temperatureClasses` (6) classes of equal size by air temperature, so the
 *   temperature response of respiration does not pose as a u* effect; a class where temperature
 *   and u* correlate (|r| >= 0.4, from memory) is left out;
 * - each temperature class into `ustarClasses` (20) classes of equal size by u*;
 * - the threshold of a temperature class is the mean u* of the first u* class whose mean flux
 *   reaches `plateauFraction` (99 %) of the mean flux of the (up to 10, from memory) classes above it;
 * - the seasonal threshold is the median over temperature classes, the annual one the maximum
 *   over the seasons of a season-year;
 * - uncertainty: the whole estimate repeated on `bootstrap` resamples (with replacement) of each
 *   season's nighttime points, seeded, so the same data always give the same figures.
 *
 * The flux is taken to be a nighttime respiration flux (positive upward), such as FC.
 */

export interface UstarOptions {
  temperatureClasses: number;
  ustarClasses: number;
  plateauFraction: number;
  bootstrap: number;
  /** fewest points per u* class for a temperature class to be used (common practice: a few) */
  minPointsPerClass?: number;
  /** u* classes above a candidate that form its reference mean (10, from memory) */
  followingClasses?: number;
  /** |Pearson r| of temperature and u* above which a temperature class is left out (0.4, from memory) */
  maxTemperatureCorrelation?: number;
  seed?: number;
}

export const DEFAULT_USTAR_OPTIONS: UstarOptions = {
  temperatureClasses: 6,
  ustarClasses: 20,
  plateauFraction: 0.99,
  bootstrap: 100,
};

/** Summary of a bootstrap distribution, m s-1. */
export interface ThresholdUncertainty {
  resamples: number;
  /** resamples that gave a threshold */
  found: number;
  p05: number | null;
  p50: number | null;
  p95: number | null;
  sd: number | null;
}

export interface SeasonThreshold {
  seasonYear: number;
  season: Season;
  /** m s-1; null when no temperature class gave one */
  thresholdMs: number | null;
  /** nighttime points with u*, flux and temperature */
  points: number;
  temperatureClassesUsed: number;
  uncertainty: ThresholdUncertainty;
}

export interface AnnualThreshold {
  seasonYear: number;
  /** maximum of the seasonal thresholds, m s-1 */
  thresholdMs: number | null;
  uncertainty: ThresholdUncertainty;
}

export interface UstarResult {
  seasons: SeasonThreshold[];
  annual: AnnualThreshold[];
}

/** Inputs for the threshold: aligned arrays, NaN = missing. */
export interface UstarInput {
  startMs: Float64Array;
  /** friction velocity, m s-1 */
  ustar: Float64Array;
  /** nighttime flux, e.g. FC in umol m-2 s-1 */
  flux: Float64Array;
  /** air temperature, degC */
  ta: Float64Array;
  /** 1 = night (see nightMask) */
  night: Uint8Array;
  /** UTC offset of the data clock, hours (for local months) */
  utcOffsetHours: number;
  latitudeDeg: number;
}

/** mulberry32: a small seeded generator, enough for resampling. */
function prng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Order of points by a key: order[r] is the point at rank r. */
function orderBy(values: Float64Array): Int32Array {
  return Int32Array.from({ length: values.length }, (_, i) => i).sort(
    (a, b) => (values[a] as number) - (values[b] as number),
  );
}

/** One season's night points with their orders by temperature and by u*. */
interface Group {
  u: Float64Array;
  f: Float64Array;
  t: Float64Array;
  byT: Int32Array;
  byU: Int32Array;
  /** scratch: copies of each point in a resample, per point */
  copies: Int32Array;
}

function prepareGroup(u: Float64Array, f: Float64Array, t: Float64Array): Group {
  return { u, f, t, byT: orderBy(t), byU: orderBy(u), copies: new Int32Array(u.length) };
}

function pearson(ids: Int32Array, x: Float64Array, y: Float64Array): number {
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < ids.length; i++) {
    const j = ids[i] as number;
    sx += x[j] as number;
    sy += y[j] as number;
  }
  const mx = sx / ids.length;
  const my = sy / ids.length;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < ids.length; i++) {
    const j = ids[i] as number;
    const dx = (x[j] as number) - mx;
    const dy = (y[j] as number) - my;
    sxy += dx * dy;
    sxx += dx * dx;
    syy += dy * dy;
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : 0;
}

/**
 * Threshold of one temperature class of points sorted by u*: mean u* of the first class whose
 * mean flux reaches `plateau` times the mean flux of the classes above it; null when none does.
 */
function classThreshold(
  sortedByU: Int32Array,
  g: Group,
  nClasses: number,
  plateau: number,
  following: number,
): number | null {
  const n = sortedByU.length;
  const meanU = new Float64Array(nClasses);
  const meanF = new Float64Array(nClasses);
  for (let c = 0; c < nClasses; c++) {
    const a = Math.floor((c * n) / nClasses);
    const b = Math.floor(((c + 1) * n) / nClasses);
    let su = 0;
    let sf = 0;
    for (let i = a; i < b; i++) {
      const j = sortedByU[i] as number;
      su += g.u[j] as number;
      sf += g.f[j] as number;
    }
    meanU[c] = su / Math.max(1, b - a);
    meanF[c] = sf / Math.max(1, b - a);
  }
  for (let c = 0; c < nClasses - 1; c++) {
    let s = 0;
    const end = Math.min(nClasses, c + 1 + following);
    for (let k = c + 1; k < end; k++) s += meanF[k] as number;
    const above = s / (end - c - 1);
    if (above > 0 && (meanF[c] as number) >= plateau * above) return meanU[c] as number;
  }
  return null;
}

/** Expands `g.copies` along an order into a sorted list of point ids (a counting sort). */
function expand(order: Int32Array, copies: Int32Array, total: number): Int32Array {
  const out = new Int32Array(total);
  let k = 0;
  for (let r = 0; r < order.length; r++) {
    const j = order[r] as number;
    for (let c = copies[j] as number; c > 0; c--) out[k++] = j;
  }
  return out;
}

/**
 * Seasonal threshold of a sample given as copies per point (all 1 for the data itself):
 * median over the usable temperature classes. Orders come from counting, not comparing,
 * so a bootstrap resample costs a few passes over the season's points.
 */
function seasonalThreshold(
  g: Group,
  total: number,
  o: Required<UstarOptions>,
): { thresholdMs: number | null; used: number } {
  const byT = expand(g.byT, g.copies, total);
  const found: number[] = [];
  let used = 0;
  const inClass = new Int32Array(g.u.length);
  for (let k = 0; k < o.temperatureClasses; k++) {
    const cls = byT.subarray(
      Math.floor((k * total) / o.temperatureClasses),
      Math.floor(((k + 1) * total) / o.temperatureClasses),
    );
    if (cls.length < o.ustarClasses * o.minPointsPerClass) continue;
    if (Math.abs(pearson(cls, g.t, g.u)) >= o.maxTemperatureCorrelation) continue;
    used++;
    for (let i = 0; i < cls.length; i++) {
      const j = cls[i] as number;
      inClass[j] = (inClass[j] as number) + 1;
    }
    const byU = expand(g.byU, inClass, cls.length);
    for (let i = 0; i < cls.length; i++) inClass[cls[i] as number] = 0;
    const th = classThreshold(byU, g, o.ustarClasses, o.plateauFraction, o.followingClasses);
    if (th !== null) found.push(th);
  }
  return { thresholdMs: found.length > 0 ? median(found) : null, used };
}

function summarise(values: number[], resamples: number): ThresholdUncertainty {
  if (values.length === 0) return { resamples, found: 0, p05: null, p50: null, p95: null, sd: null };
  const sorted = [...values].sort((a, b) => a - b);
  const mean = sorted.reduce((s, v) => s + v, 0) / sorted.length;
  const sd =
    sorted.length > 1 ? Math.sqrt(sorted.reduce((s, v) => s + (v - mean) ** 2, 0) / (sorted.length - 1)) : 0;
  return {
    resamples,
    found: sorted.length,
    p05: quantileSorted(sorted, 0.05),
    p50: quantileSorted(sorted, 0.5),
    p95: quantileSorted(sorted, 0.95),
    sd,
  };
}

/**
 * Seasonal and annual u* thresholds of every season-year in the data, with bootstrap uncertainty.
 */
export function ustarThresholds(input: UstarInput, options: Partial<UstarOptions> = {}): UstarResult {
  const o: Required<UstarOptions> = {
    minPointsPerClass: 3,
    followingClasses: 10,
    maxTemperatureCorrelation: 0.4,
    seed: 1,
    ...DEFAULT_USTAR_OPTIONS,
    ...options,
  };
  const offsetMs = input.utcOffsetHours * 3_600_000;
  // night points with all three values, grouped by season-year and season
  const keep: number[] = [];
  const groups = new Map<string, { seasonYear: number; season: Season; ids: number[] }>();
  for (let i = 0; i < input.startMs.length; i++) {
    if (input.night[i] !== 1) continue;
    const u = input.ustar[i] as number;
    const f = input.flux[i] as number;
    const t = input.ta[i] as number;
    if (!Number.isFinite(u) || !Number.isFinite(f) || !Number.isFinite(t)) continue;
    const d = new Date((input.startMs[i] as number) + offsetMs);
    const { season, seasonYear } = seasonOfMonth(d.getUTCFullYear(), d.getUTCMonth(), input.latitudeDeg);
    const key = `${seasonYear}:${season}`;
    let g = groups.get(key);
    if (!g) groups.set(key, (g = { seasonYear, season, ids: [] }));
    g.ids.push(keep.length);
    keep.push(i);
  }
  const pick = (src: Float64Array, ids: number[]) =>
    Float64Array.from(ids, (k) => src[keep[k] as number] as number);

  const seasons: SeasonThreshold[] = [];
  const byYear = new Map<number, { estimate: Array<number | null>; resampled: Float64Array[] }>();
  const ordered = [...groups.values()].sort(
    (a, b) => a.seasonYear - b.seasonYear || SEASONS.indexOf(a.season) - SEASONS.indexOf(b.season),
  );
  for (const grp of ordered) {
    const g = prepareGroup(pick(input.ustar, grp.ids), pick(input.flux, grp.ids), pick(input.ta, grp.ids));
    const n = g.u.length;
    g.copies.fill(1);
    const est = seasonalThreshold(g, n, o);
    // seeded per season-year and season, so adding a year leaves the others' figures unchanged
    const rand = prng(o.seed * 7919 + grp.seasonYear * 31 + SEASONS.indexOf(grp.season));
    const resampled = new Float64Array(o.bootstrap).fill(Number.NaN);
    for (let b = 0; b < o.bootstrap; b++) {
      g.copies.fill(0);
      for (let k = 0; k < n; k++) {
        const j = Math.floor(rand() * n);
        g.copies[j] = (g.copies[j] as number) + 1;
      }
      resampled[b] = seasonalThreshold(g, n, o).thresholdMs ?? Number.NaN;
    }
    seasons.push({
      seasonYear: grp.seasonYear,
      season: grp.season,
      thresholdMs: est.thresholdMs,
      points: n,
      temperatureClassesUsed: est.used,
      uncertainty: summarise([...resampled].filter(Number.isFinite), o.bootstrap),
    });
    let y = byYear.get(grp.seasonYear);
    if (!y) byYear.set(grp.seasonYear, (y = { estimate: [], resampled: [] }));
    y.estimate.push(est.thresholdMs);
    y.resampled.push(resampled);
  }

  const annual: AnnualThreshold[] = [...byYear.entries()].map(([seasonYear, y]) => {
    const found = y.estimate.filter((v): v is number => v !== null);
    const maxima: number[] = [];
    for (let b = 0; b < o.bootstrap; b++) {
      let m = Number.NaN;
      for (const r of y.resampled) {
        const v = r[b] as number;
        if (Number.isFinite(v) && !(v <= m)) m = v;
      }
      if (Number.isFinite(m)) maxima.push(m);
    }
    return {
      seasonYear,
      thresholdMs: found.length > 0 ? Math.max(...found) : null,
      uncertainty: summarise(maxima, o.bootstrap),
    };
  });
  return { seasons, annual };
}
