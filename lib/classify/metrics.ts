import type { HalfHourTable } from "@/lib/series/types";
import { standardPressurePa } from "@/lib/physics/air";
import { dewPointC } from "@/lib/physics/humidity";
import { median } from "@/lib/physics/robust";
import { sigmaWOverUstarModel } from "@/lib/physics/similarity";
import { displacementHeightM, obukhovFromTowerM } from "@/lib/physics/stability";
import { directionStats, signedShiftDeg } from "@/lib/physics/wind";
import type { RuleSet } from "./rules";
import type { SiteParams } from "./site";

/** Metrics of one evening; null where the data did not allow the metric. */
export interface EveningMetrics {
  /** mean sigma_w per window, m s-1 */
  sigmaWAfternoon: number | null;
  sigmaWTransition: number | null;
  sigmaWEvening: number | null;
  /** sigmaWEvening / sigmaWAfternoon */
  sigmaWDecay: number | null;
  /** mean u* per window, m s-1 */
  ustarAfternoon: number | null;
  ustarEvening: number | null;
  /** mean wind speed in the evening window, m s-1 */
  windSpeedEvening: number | null;
  /** signed shift afternoon -> evening of the unit-vector mean direction, deg in [-180, 180); null in calm */
  wdShiftDeg: number | null;
  /** Yamartino sigma_theta of the evening's half-hourly directions (non-calm), deg */
  sigmaThetaEvening: number | null;
  /** median z/L in the evening window */
  zetaEvening: number | null;
  /** minutes from sunset to the (last) positive-to-negative crossing of H, interpolated; negative = before sunset */
  hZeroCrossingMinutes: number | null;
  /** (mean TA afternoon - mean TA evening) / hours between window centres, K h-1; positive = cooling */
  coolingRateKPerH: number | null;
  /** mean dew point evening - afternoon, K */
  dewPointChangeK: number | null;
  /** fraction 0..1 of expected periods with valid sigma_w (measured or derived) and wind speed */
  coverage: { afternoon: number; transition: number; evening: number };
  /** which inputs were derived rather than measured in this evening's windows */
  derived: string[];
}

export const DERIVED_ZL = "ZL from H, USTAR, TA, PA and heights (Obukhov length)";
export const DERIVED_ZL_FROM_L = "ZL from MO_LENGTH and heights";
export const DERIVED_SIGMA_W = "W_SIGMA from USTAR (Kaimal & Finnigan 1994 similarity)";
export const DERIVED_PA = "PA from elevation (ISA standard atmosphere)";

/** Columns the classifier reads, with derived values filled in once for the whole table. */
export interface PreparedColumns {
  n: number;
  startMs: Float64Array;
  periodMs: number;
  ws: Float64Array | null;
  wd: Float64Array | null;
  ustar: Float64Array | null;
  sigmaW: Float64Array | null;
  h: Float64Array | null;
  ta: Float64Array | null;
  dewPoint: Float64Array | null;
  zeta: Float64Array | null;
  /** 1 where the value at that row was derived */
  sigmaWDerived: Uint8Array;
  zetaDerived: Uint8Array;
  zetaDerivedNote: string;
  paFromElevation: boolean;
}

/**
 * One pass over the table: derive z/L where ZL is missing (from MO_LENGTH, else from H, u*, TA, PA
 * with PA from the ISA when absent) and sigma_w where W_SIGMA is missing (u* times the
 * Kaimal & Finnigan model at that z/L, neutral 1.25 when z/L is unknown).
 */
export function prepareColumns(table: HalfHourTable, site: SiteParams): PreparedColumns {
  const n = table.startMs.length;
  const col = (name: string): Float64Array | null => {
    const c = table.columns[name];
    return c && c.length === n ? c : null;
  };
  const ws = col("WS");
  const wd = col("WD");
  const ustar = col("USTAR");
  const h = col("H");
  const ta = col("TA");
  const pa = col("PA");
  const rh = col("RH");
  const zlIn = col("ZL");
  const lIn = col("MO_LENGTH");
  const wsigIn = col("W_SIGMA");
  const zEff = site.measurementHeightM - displacementHeightM(site.canopyHeightM, site.displacementHeightM);
  const paStd = standardPressurePa(site.elevationM) / 1000;

  const zetaDerived = new Uint8Array(n);
  let zeta: Float64Array | null = zlIn;
  let paFromElevation = false;
  const canDerive = ustar !== null && h !== null && ta !== null;
  const needZeta = zlIn === null || hasNaN(zlIn);
  if (needZeta && (lIn !== null || canDerive)) {
    zeta = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const z0 = zlIn ? (zlIn[i] as number) : Number.NaN;
      if (z0 === z0) {
        zeta[i] = z0;
        continue;
      }
      const l = lIn ? (lIn[i] as number) : Number.NaN;
      if (l === l && l !== 0) {
        zeta[i] = zEff / l;
        zetaDerived[i] = 2;
        continue;
      }
      if (canDerive) {
        let p = pa ? (pa[i] as number) : Number.NaN;
        if (!(p > 0)) {
          p = paStd;
          paFromElevation = true;
        }
        const lo = obukhovFromTowerM(h[i] as number, ustar[i] as number, ta[i] as number, p);
        const zz = zEff / lo;
        zeta[i] = zz;
        if (zz === zz) zetaDerived[i] = 1;
      } else zeta[i] = Number.NaN;
    }
  }

  const sigmaWDerived = new Uint8Array(n);
  let sigmaW: Float64Array | null = wsigIn;
  if ((wsigIn === null || hasNaN(wsigIn)) && ustar !== null) {
    sigmaW = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const s = wsigIn ? (wsigIn[i] as number) : Number.NaN;
      if (s === s) {
        sigmaW[i] = s;
        continue;
      }
      const u = ustar[i] as number;
      const zz = zeta ? (zeta[i] as number) : Number.NaN;
      const ratio = zz === zz ? sigmaWOverUstarModel(zz, true) : 1.25;
      sigmaW[i] = u * ratio;
      if (u === u) sigmaWDerived[i] = 1;
    }
  }

  let dewPoint: Float64Array | null = null;
  if (ta && rh) {
    dewPoint = new Float64Array(n);
    for (let i = 0; i < n; i++) dewPoint[i] = dewPointC(ta[i] as number, rh[i] as number);
  }

  return {
    n,
    startMs: table.startMs,
    periodMs: table.periodMinutes * 60_000,
    ws,
    wd,
    ustar,
    sigmaW,
    h,
    ta,
    dewPoint,
    zeta,
    sigmaWDerived,
    zetaDerived,
    zetaDerivedNote: DERIVED_ZL,
    paFromElevation,
  };
}

function hasNaN(a: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (a[i] !== a[i]) return true;
  return false;
}

/** First index i with a[i] >= x (a strictly increasing). */
export function lowerBound(a: Float64Array, x: number): number {
  let lo = 0;
  let hi = a.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((a[mid] as number) < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Row range [from, to) whose period midpoints fall in [startMs, endMs). */
export function windowRows(p: PreparedColumns, startMs: number, endMs: number): [number, number] {
  const half = p.periodMs / 2;
  return [lowerBound(p.startMs, startMs - half), lowerBound(p.startMs, endMs - half)];
}

function meanOf(a: Float64Array | null, from: number, to: number): number | null {
  if (!a) return null;
  let s = 0;
  let n = 0;
  for (let i = from; i < to; i++) {
    const v = a[i] as number;
    if (v === v) {
      s += v;
      n++;
    }
  }
  return n === 0 ? null : s / n;
}

function countValid(a: Float64Array | null, from: number, to: number): number {
  if (!a) return 0;
  let n = 0;
  for (let i = from; i < to; i++) if (a[i] === a[i]) n++;
  return n;
}

function coreCoverage(p: PreparedColumns, from: number, to: number, expected: number): number {
  if (!p.sigmaW || !p.ws || expected <= 0) return 0;
  let n = 0;
  for (let i = from; i < to; i++) if (p.sigmaW[i] === p.sigmaW[i] && p.ws[i] === p.ws[i]) n++;
  return Math.min(1, n / expected);
}

function anyFlag(flags: Uint8Array, from: number, to: number, value?: number): boolean {
  for (let i = from; i < to; i++) {
    const f = flags[i] as number;
    if (value === undefined ? f !== 0 : f === value) return true;
  }
  return false;
}

/** Row range [from, to) of a window and the number of periods it should hold. */
export type WindowRows = [from: number, to: number, expected: number];

export interface ComputedEvening {
  metrics: EveningMetrics;
  rows: { afternoon: WindowRows; transition: WindowRows; evening: WindowRows };
}

/** Coverage 0..1 of each input variable in a window, for explaining unclassified evenings. */
export function variableCoverage(p: PreparedColumns, [from, to, expected]: WindowRows): Record<string, number> {
  const out: Record<string, number> = {};
  const vars: Array<[string, Float64Array | null]> = [
    ["W_SIGMA", p.sigmaW],
    ["USTAR", p.ustar],
    ["WS", p.ws],
  ];
  for (const [name, arr] of vars) out[name] = expected > 0 ? Math.min(1, countValid(arr, from, to) / expected) : 0;
  return out;
}

/**
 * Metrics of one evening with the given sunset.
 * @param sunsetMs UTC epoch ms of sunset
 */
export function eveningMetrics(p: PreparedColumns, sunsetMs: number, rules: RuleSet): ComputedEvening {
  const w = rules.windows;
  const minute = 60_000;
  const aS = sunsetMs + w.afternoon.startMinutes * minute;
  const aE = sunsetMs + w.afternoon.endMinutes * minute;
  const tS = sunsetMs + w.transition.startMinutes * minute;
  const tE = sunsetMs + w.transition.endMinutes * minute;
  const eS = sunsetMs + w.evening.startMinutes * minute;
  const eE = sunsetMs + w.evening.endMinutes * minute;
  const [a0, a1] = windowRows(p, aS, aE);
  const [t0, t1] = windowRows(p, tS, tE);
  const [e0, e1] = windowRows(p, eS, eE);
  const expA = (aE - aS) / p.periodMs;
  const expT = (tE - tS) / p.periodMs;
  const expE = (eE - eS) / p.periodMs;

  const covA = coreCoverage(p, a0, a1, expA);
  const covT = coreCoverage(p, t0, t1, expT);
  const covE = coreCoverage(p, e0, e1, expE);

  const sigmaWAfternoon = meanOf(p.sigmaW, a0, a1);
  const sigmaWTransition = meanOf(p.sigmaW, t0, t1);
  const sigmaWEvening = meanOf(p.sigmaW, e0, e1);
  const ustarAfternoon = meanOf(p.ustar, a0, a1);
  const ustarEvening = meanOf(p.ustar, e0, e1);
  const windSpeedEvening = meanOf(p.ws, e0, e1);

  let wdShiftDeg: number | null = null;
  let sigmaThetaEvening: number | null = null;
  if (p.wd && p.ws) {
    const calm = rules.calmSpeedMs;
    const dirA = directionStats(p.wd, a0, a1, p.ws, calm);
    const dirE = directionStats(p.wd, e0, e1, p.ws, calm);
    sigmaThetaEvening = dirE.sigmaThetaDeg;
    const wsA = meanOf(p.ws, a0, a1);
    if (
      dirA.meanDeg !== null &&
      dirE.meanDeg !== null &&
      wsA !== null &&
      wsA >= calm &&
      windSpeedEvening !== null &&
      windSpeedEvening >= calm
    ) {
      wdShiftDeg = signedShiftDeg(dirA.meanDeg, dirE.meanDeg);
    }
  }

  let zetaEvening: number | null = null;
  if (p.zeta) {
    const m = median(p.zeta.subarray(e0, e1));
    zetaEvening = Number.isFinite(m) ? m : null;
  }

  const hZeroCrossingMinutes = p.h ? zeroCrossingMinutes(p, a0, e1, sunsetMs) : null;

  const taA = meanOf(p.ta, a0, a1);
  const taE = meanOf(p.ta, e0, e1);
  const hoursBetween = (eS + eE - aS - aE) / 2 / 3_600_000;
  const coolingRateKPerH = taA !== null && taE !== null && hoursBetween > 0 ? (taA - taE) / hoursBetween : null;
  const tdA = meanOf(p.dewPoint, a0, a1);
  const tdE = meanOf(p.dewPoint, e0, e1);
  const dewPointChangeK = tdA !== null && tdE !== null ? tdE - tdA : null;

  const derived: string[] = [];
  const lo = Math.min(a0, t0, e0);
  const hi = Math.max(a1, t1, e1);
  if (anyFlag(p.zetaDerived, lo, hi, 1)) {
    derived.push(DERIVED_ZL);
    if (p.paFromElevation) derived.push(DERIVED_PA);
  }
  if (anyFlag(p.zetaDerived, lo, hi, 2)) derived.push(DERIVED_ZL_FROM_L);
  if (anyFlag(p.sigmaWDerived, lo, hi)) derived.push(DERIVED_SIGMA_W);

  return {
    metrics: {
      sigmaWAfternoon,
      sigmaWTransition,
      sigmaWEvening,
      sigmaWDecay:
        sigmaWAfternoon !== null && sigmaWEvening !== null && sigmaWAfternoon > 0 ? sigmaWEvening / sigmaWAfternoon : null,
      ustarAfternoon,
      ustarEvening,
      windSpeedEvening,
      wdShiftDeg,
      sigmaThetaEvening,
      zetaEvening,
      hZeroCrossingMinutes,
      coolingRateKPerH,
      dewPointChangeK,
      coverage: { afternoon: covA, transition: covT, evening: covE },
      derived,
    },
    rows: { afternoon: [a0, a1, expA], transition: [t0, t1, expT], evening: [e0, e1, expE] },
  };
}

/**
 * Last positive-to-non-positive crossing of H between consecutive valid rows (at most two periods
 * apart), linearly interpolated between period midpoints; minutes relative to sunset.
 */
function zeroCrossingMinutes(p: PreparedColumns, from: number, to: number, sunsetMs: number): number | null {
  const h = p.h as Float64Array;
  const half = p.periodMs / 2;
  let prev = -1;
  let found: number | null = null;
  for (let i = from; i < to; i++) {
    const v = h[i] as number;
    if (v !== v) continue;
    if (prev >= 0) {
      const pv = h[prev] as number;
      const tPrev = (p.startMs[prev] as number) + half;
      const tCur = (p.startMs[i] as number) + half;
      if (pv > 0 && v <= 0 && tCur - tPrev <= 2 * p.periodMs) {
        const t = tPrev + ((tCur - tPrev) * pv) / (pv - v);
        found = (t - sunsetMs) / 60_000;
      }
    }
    prev = i;
  }
  return found;
}
