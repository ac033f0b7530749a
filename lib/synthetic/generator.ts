import { getPosition } from "suncalc";
import type { SiteParams } from "@/lib/classify/site";
import type { HalfHourTable } from "@/lib/series/types";
import { standardPressurePa } from "@/lib/physics/air";
import { saturationVapourPressureHPa } from "@/lib/physics/humidity";
import { sigmaWOverUstarModel } from "@/lib/physics/similarity";
import { VON_KARMAN, displacementHeightM, obukhovFromTowerM } from "@/lib/physics/stability";
import { eveningSun, localDateOf, localMidnightUtcMs } from "@/lib/physics/sun";

/**
 * SYNTHETIC tower data: a physically based, deterministic generator of half-hourly records for
 * tests, the benchmark and the demo scenario. Nothing here is a measurement.
 *
 * Radiation follows the solar elevation; H follows radiation by day and a night value set by the
 * evening's kind; u* follows the wind through a neutral drag coefficient from the site's roughness;
 * z/L comes from the Obukhov length of the generated H, u*, TA, PA; sigma_w from u* by the
 * Kaimal & Finnigan (1994) similarity model. Every value depends only on the seed, the row's index
 * and its day's parameters, so any block of days can be generated alone and blocks concatenate.
 */

export type EveningKind = "local" | "stagnant" | "advective";

export interface SyntheticOptions {
  site: SiteParams;
  /** first local date (data clock) YYYY-MM-DD; rows start at its local midnight */
  startDate: string;
  days: number;
  seed: number;
  /** averaging period, minutes (default 30) */
  periodMinutes?: number;
  /** force the kind of the evening of given local dates */
  kinds?: Record<string, EveningKind>;
  /** relative frequencies of the kinds (default local 0.5, stagnant 0.25, advective 0.25) */
  mix?: Partial<Record<EveningKind, number>>;
  /** extra synthetic tracer columns, e.g. ["O3", "TRACER_2"] (nmol mol-1) */
  tracers?: string[];
  /** fraction of cells (each column independently) set missing, 0..1 */
  gapFraction?: number;
  /** columns to leave out (e.g. W_SIGMA or ZL, to test derivation) */
  omit?: string[];
  /**
   * Injected excursions with a known truth: on each listed local date, `column` gains `amplitude`
   * (in its unit) after sunset, ramping in over the first hour, held to S+3 h, gone by S+4 h.
   */
  injections?: SyntheticInjection[];
  /**
   * When set, nighttime FC is a temperature-driven respiration flux damped in proportion to
   * u* below this friction velocity (m s-1): a known u* threshold for the flux filter.
   */
  ustarThresholdMs?: number;
}

export interface SyntheticInjection {
  date: string;
  column: string;
  amplitude: number;
}

export interface SyntheticTruth {
  date: string;
  kind: EveningKind;
  /** advective evenings: "front" (direction shift) or "jet" (strong sustained wind) */
  variant: "front" | "jet" | null;
}

export interface SyntheticResult {
  table: HalfHourTable;
  truth: SyntheticTruth[];
  /** always true: marks the data as synthetic wherever it travels */
  synthetic: true;
}

export const SYNTHETIC_COLUMNS = [
  "WS",
  "WD",
  "USTAR",
  "W_SIGMA",
  "H",
  "LE",
  "TA",
  "PA",
  "RH",
  "VPD",
  "ZL",
  "FC",
  "CO2",
  "SW_IN",
] as const;

const UNITS: Record<string, string> = {
  WS: "m s-1",
  WD: "deg",
  USTAR: "m s-1",
  W_SIGMA: "m s-1",
  H: "W m-2",
  LE: "W m-2",
  TA: "degC",
  PA: "kPa",
  RH: "%",
  VPD: "hPa",
  ZL: "1",
  FC: "umol m-2 s-1",
  CO2: "umol mol-1",
  SW_IN: "W m-2",
};

const DAY_MS = 86_400_000;
const HOUR_MS = 3_600_000;
const RAD = Math.PI / 180;

/** Stateless hash to [0, 1): the same (seed, index, channel) always gives the same number. */
function u01(seed: number, index: number, channel: number): number {
  let h = (seed ^ Math.imul(index + 0x632be5ab, 0x9e3779b1) ^ Math.imul(channel + 1, 0x85ebca77)) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x7feb352d);
  h = Math.imul(h ^ (h >>> 15), 0x846ca68b);
  h ^= h >>> 16;
  return (h >>> 0) / 4294967296;
}

function gauss(seed: number, index: number, channel: number): number {
  const a = Math.max(1e-12, u01(seed, index, channel));
  const b = u01(seed, index, channel + 7919);
  return Math.sqrt(-2 * Math.log(a)) * Math.cos(2 * Math.PI * b);
}

function smoothstep(x: number): number {
  const t = Math.min(1, Math.max(0, x));
  return t * t * (3 - 2 * t);
}

interface DayParams {
  date: string;
  kind: EveningKind;
  variant: "front" | "jet" | null;
  sunsetMs: number | null;
  sunriseMs: number | null;
  solarNoonMs: number;
  /** afternoon wind speed, m s-1 */
  windDay: number;
  /** evening wind speed, m s-1 */
  windNight: number;
  dirDay: number;
  /** direction change from afternoon to night, deg */
  dirShift: number;
  /** ratio of night u* to the neutral-drag u* of the night wind */
  ustarNightFactor: number;
  hNight: number;
  tMean: number;
  tAmplitude: number;
  nightCooling: number;
  dewSpread: number;
  dewJump: number;
  cloud: number;
  paOffset: number;
}

function drawKind(seed: number, day: number, mix: Record<EveningKind, number>): EveningKind {
  const total = mix.local + mix.stagnant + mix.advective;
  const u = u01(seed, day, 101) * total;
  if (u < mix.local) return "local";
  if (u < mix.local + mix.stagnant) return "stagnant";
  return "advective";
}

function dayParams(opts: SyntheticOptions, startMidnightMs: number, day: number): DayParams {
  const { site, seed } = opts;
  const mix = { local: 0.5, stagnant: 0.25, advective: 0.25, ...opts.mix };
  const midnight = startMidnightMs + day * DAY_MS;
  const date = localDateOf(midnight, site.utcOffsetHours);
  const kind = opts.kinds?.[date] ?? drawKind(seed, day, mix);
  const sun = eveningSun(date, site.latitudeDeg, site.longitudeDeg, site.utcOffsetHours);
  const r = (ch: number): number => u01(seed, day, ch);
  const variant = kind === "advective" ? (r(102) < 0.55 ? "front" : "jet") : null;
  const windDay = 2.8 + 2.7 * r(103);
  const doy = (midnight - Date.UTC(new Date(midnight).getUTCFullYear(), 0, 1)) / DAY_MS;
  const season = -Math.cos((2 * Math.PI * (doy - 15)) / 365) * Math.sign(site.latitudeDeg || 1);
  const tMean = 14 - 0.3 * Math.max(0, Math.abs(site.latitudeDeg) - 25) + 9 * season - 0.0065 * site.elevationM + 3 * (r(104) - 0.5);
  const base: DayParams = {
    date,
    kind,
    variant,
    sunsetMs: sun.sunsetMs,
    sunriseMs: sun.sunriseMs,
    solarNoonMs: sun.solarNoonMs,
    windDay,
    windNight: 0,
    dirDay: 360 * r(105),
    dirShift: 30 * (r(106) - 0.5),
    ustarNightFactor: 0,
    hNight: 0,
    tMean,
    tAmplitude: 3 + 3 * r(107),
    nightCooling: 0,
    dewSpread: 4 + 6 * r(108),
    dewJump: 0,
    cloud: 0.75 + 0.25 * r(109),
    paOffset: 0.6 * Math.sin((2 * Math.PI * day) / 6.3) + 0.3 * (r(110) - 0.5),
  };
  switch (kind) {
    case "local":
      // radiative cooling under light wind: turbulence decays, a stable layer forms
      base.windNight = 1.7 + 1.2 * r(111);
      base.ustarNightFactor = 0.55 + 0.2 * r(112);
      base.hNight = -(18 + 14 * r(113));
      base.nightCooling = 1.5 + 1.5 * r(114);
      break;
    case "stagnant":
      base.windNight = 0.25 + 0.6 * r(111);
      base.ustarNightFactor = 0.45 + 0.2 * r(112);
      base.hNight = -(3 + 5 * r(113));
      base.nightCooling = 2.5 + 2 * r(114);
      base.dirShift = 360 * r(115);
      break;
    case "advective":
      if (variant === "front") {
        base.windNight = Math.max(3.5, windDay * (1 + 0.3 * r(111)));
        const sign = r(116) < 0.5 ? -1 : 1;
        base.dirShift = sign * (70 + 80 * r(115));
        base.dewJump = (r(117) < 0.5 ? -1 : 1) * (2 + 2 * r(118));
        base.nightCooling = 1 + r(114);
      } else {
        base.windNight = 6 + 3 * r(111);
        base.dirShift = 15 + 20 * r(115);
        base.nightCooling = 0.3 + 0.5 * r(114);
      }
      base.ustarNightFactor = 0.85 + 0.15 * r(112);
      base.hNight = -(40 + 20 * r(113));
      break;
  }
  return base;
}

/** Neutral drag coefficient sqrt(C_D) = k / ln((z - d) / z0), z0 = 0.1 h_c, kept in a plausible range. */
function neutralDrag(site: SiteParams): number {
  const d = displacementHeightM(site.canopyHeightM, site.displacementHeightM);
  const z0 = Math.max(0.01, 0.1 * site.canopyHeightM);
  const c = VON_KARMAN / Math.log(Math.max(1.5, (site.measurementHeightM - d) / z0));
  return Math.min(0.2, Math.max(0.06, c));
}

/**
 * Generates days [fromDay, toDay) (0 = startDate). Blocks generated separately concatenate to the
 * same table as one call over the whole range.
 */
export function generateSyntheticRange(opts: SyntheticOptions, fromDay: number, toDay: number): SyntheticResult {
  const { site, seed } = opts;
  const periodMinutes = opts.periodMinutes ?? 30;
  const periodMs = periodMinutes * 60_000;
  const perDay = Math.round(DAY_MS / periodMs);
  const startMidnight = localMidnightUtcMs(opts.startDate, site.utcOffsetHours);
  const n = Math.max(0, toDay - fromDay) * perDay;
  const startMs = new Float64Array(n);
  const cols: Record<string, Float64Array> = {};
  const omit = new Set(opts.omit ?? []);
  const tracers = opts.tracers ?? [];
  for (const c of SYNTHETIC_COLUMNS) cols[c] = new Float64Array(n);
  for (const t of tracers) cols[t] = new Float64Array(n);

  const injected = new Map<string, Array<{ column: string; amplitude: number }>>();
  for (const inj of opts.injections ?? []) {
    const list = injected.get(inj.date) ?? [];
    list.push({ column: inj.column, amplitude: inj.amplitude });
    injected.set(inj.date, list);
  }
  const cache = new Map<number, DayParams>();
  const params = (day: number): DayParams => {
    let p = cache.get(day);
    if (!p) {
      p = dayParams(opts, startMidnight, day);
      cache.set(day, p);
    }
    return p;
  };
  const drag = neutralDrag(site);
  const zEff = site.measurementHeightM - displacementHeightM(site.canopyHeightM, site.displacementHeightM);
  const pa0 = standardPressurePa(site.elevationM) / 1000;

  for (let j = 0; j < n; j++) {
    const i = fromDay * perDay + j; // global row index: the noise key
    const t0 = startMidnight + i * periodMs;
    const tm = t0 + periodMs / 2;
    startMs[j] = t0;
    // the evening that governs this row: the last local noon at or before it
    const day = Math.floor((tm - startMidnight - DAY_MS / 2) / DAY_MS);
    const p = params(day);
    const next = params(day + 1);
    const elev = getPosition(new Date(tm), site.latitudeDeg, site.longitudeDeg).altitude;
    // 0 by day, 1 at night; from about S-1h (elevation ~10 deg) to S+1h (~-4 deg) at mid-latitudes
    const night = p.sunsetMs === null && elev > 10 ? 0 : 1 - smoothstep((elev + 4) / 14);
    const afterSunset = p.sunsetMs === null ? 0 : Math.max(0, (tm - p.sunsetMs) / HOUR_MS);
    // the next morning, from sunrise on, blends into the next day's regime; the night before stays this evening's
    const nextMorning = next.sunriseMs ?? next.solarNoonMs - DAY_MS / 4;
    const beforeNoon = tm >= nextMorning;
    const dayP = beforeNoon ? next : p;
    const sw = elev > 0 ? 1100 * Math.pow(Math.sin(elev * RAD), 1.15) * dayP.cloud * (1 + 0.04 * gauss(seed, i, 1)) : 0;

    // advective shift arrives over S-0.5h..S+0.5h; other kinds drift with the night fraction
    const shiftRamp =
      p.kind === "advective" && p.sunsetMs !== null && !beforeNoon
        ? smoothstep((tm - p.sunsetMs + 0.5 * HOUR_MS) / HOUR_MS)
        : night;
    const ws = Math.max(
      0.1,
      ((1 - night) * dayP.windDay * (0.85 + 0.15 * Math.min(1, sw / 600)) + night * p.windNight) *
        (1 + 0.07 * gauss(seed, i, 2)),
    );
    let wd = dayP.dirDay + shiftRamp * p.dirShift + (p.kind === "stagnant" && night > 0.5 ? 80 : 8) * gauss(seed, i, 3);
    wd = ((wd % 360) + 360) % 360;

    const ustarDay = Math.max(0.18, drag * ws * 1.15);
    const ustarNight = drag * ws * p.ustarNightFactor;
    const ustar =
      Math.max(0.01, (1 - night) * ustarDay + night * (p.kind === "stagnant" ? Math.min(ustarNight, 0.07) : ustarNight)) *
      (1 + 0.06 * gauss(seed, i, 4));

    const hDay = 0.38 * sw - 22;
    const h = (1 - night) * hDay + night * p.hNight + 4 * gauss(seed, i, 5);
    const le = 0.32 * sw + (1 - night) * 10 + night * 5 + 6 * gauss(seed, i, 6);

    const solarHour = 12 + (tm - p.solarNoonMs) / HOUR_MS;
    const ta =
      dayP.tMean +
      dayP.tAmplitude * Math.cos((2 * Math.PI * (solarHour - 15)) / 24) -
      p.nightCooling * Math.min(4, afterSunset) * (beforeNoon ? Math.max(0, 1 - sw / 300) : 1) * 0.5 +
      0.15 * gauss(seed, i, 7);
    let td = dayP.tMean - dayP.dewSpread + shiftRamp * p.dewJump + 0.2 * gauss(seed, i, 8);
    if (td > ta) td = ta;
    const esat = saturationVapourPressureHPa(ta);
    const e = saturationVapourPressureHPa(td);
    const pa = pa0 + p.paOffset + (p.kind === "advective" && p.variant === "front" ? 0.25 * shiftRamp : 0) + 0.02 * gauss(seed, i, 9);

    const zeta = zEff / obukhovFromTowerM(h, ustar, ta, pa);
    const ratio = Number.isFinite(zeta) ? sigmaWOverUstarModel(zeta, true) : 1.25;
    const sigmaW = ustar * ratio * (1 + 0.05 * gauss(seed, i, 10));

    const accumulate = p.kind === "stagnant" ? 12 : p.kind === "local" ? 5 : 1;
    const co2 = 415 - 12 * (1 - night) * Math.min(1, sw / 500) + night * accumulate * Math.min(5, afterSunset) + 1.5 * gauss(seed, i, 11);
    const th = opts.ustarThresholdMs;
    const fc =
      th === undefined
        ? -22 * Math.min(1, sw / 800) + night * (p.kind === "stagnant" ? 1.5 : 4) + 1.2 * gauss(seed, i, 12)
        : // respiration doubling per 10 K, under-read by the flux system where turbulence is weak
          -22 * Math.min(1, sw / 800) + night * 3 * Math.pow(2, (ta - 10) / 10) * Math.min(1, ustar / th) + 0.5 * gauss(seed, i, 12);

    (cols.SW_IN as Float64Array)[j] = sw;
    (cols.WS as Float64Array)[j] = ws;
    (cols.WD as Float64Array)[j] = wd;
    (cols.USTAR as Float64Array)[j] = ustar;
    (cols.W_SIGMA as Float64Array)[j] = sigmaW;
    (cols.H as Float64Array)[j] = h;
    (cols.LE as Float64Array)[j] = le;
    (cols.TA as Float64Array)[j] = ta;
    (cols.PA as Float64Array)[j] = pa;
    (cols.RH as Float64Array)[j] = Math.min(100, (100 * e) / esat);
    (cols.VPD as Float64Array)[j] = Math.max(0, esat - e);
    (cols.ZL as Float64Array)[j] = zeta;
    (cols.FC as Float64Array)[j] = fc;
    (cols.CO2 as Float64Array)[j] = co2;
    tracers.forEach((name, k) => {
      // ozone-like: photochemical by day, lost by deposition at night where air is still
      const loss = p.kind === "stagnant" ? 5 : p.kind === "local" ? 3 : 0.5;
      (cols[name] as Float64Array)[j] =
        25 + 10 * k + 20 * Math.min(1, sw / 700) - night * loss * Math.min(5, afterSunset) + 1.5 * gauss(seed, i, 20 + k);
    });
  }

  if (injected.size > 0) {
    for (let j = 0; j < n; j++) {
      const tm = (startMs[j] as number) + periodMs / 2;
      const day = Math.floor((tm - startMidnight - DAY_MS / 2) / DAY_MS);
      const p = params(day);
      const list = injected.get(p.date);
      if (!list || p.sunsetMs === null) continue;
      const h = (tm - p.sunsetMs) / HOUR_MS;
      const shape = h <= 0 || h >= 4 ? 0 : h < 1 ? smoothstep(h) : h <= 3 ? 1 : 1 - smoothstep(h - 3);
      if (shape === 0) continue;
      for (const { column, amplitude } of list) {
        const arr = cols[column];
        if (arr) arr[j] = (arr[j] as number) + amplitude * shape;
      }
    }
  }

  const gap = opts.gapFraction ?? 0;
  const columns: HalfHourTable["columns"] = {};
  const units: HalfHourTable["units"] = {};
  Object.entries(cols).forEach(([name, arr], c) => {
    if (omit.has(name)) return;
    if (gap > 0) {
      for (let j = 0; j < n; j++) if (u01(seed, fromDay * perDay + j, 500 + c) < gap) arr[j] = Number.NaN;
    }
    columns[name] = arr;
    units[name] = UNITS[name] ?? "nmol mol-1";
  });

  const truth: SyntheticTruth[] = [];
  for (let d = fromDay; d < toDay; d++) {
    const p = params(d);
    truth.push({ date: p.date, kind: p.kind, variant: p.variant });
  }
  return { table: { startMs, periodMinutes, columns, units }, truth, synthetic: true };
}

/** Generates the whole range of opts.days days in one table. */
export function generateSynthetic(opts: SyntheticOptions): SyntheticResult {
  return generateSyntheticRange(opts, 0, opts.days);
}

/** Generates the range in blocks of blockDays, for writing long files without one big table. */
export function* generateSyntheticBlocks(opts: SyntheticOptions, blockDays = 30): Generator<SyntheticResult> {
  for (let d = 0; d < opts.days; d += blockDays) yield generateSyntheticRange(opts, d, Math.min(opts.days, d + blockDays));
}
