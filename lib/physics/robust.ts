import { median as ssMedian, medianAbsoluteDeviation } from "simple-statistics";

/**
 * Robust location and scale: median, MAD, and the modified z-score of Iglewicz & Hoaglin (1993),
 * M = 0.6745 (x - median) / MAD, with |M| > 3.5 flagged as an outlier.
 */

export const MODIFIED_Z_FLAG = 3.5;

/** Median of finite values; NaN when there are none. */
export function median(values: ArrayLike<number>): number {
  const finite = finiteValues(values);
  return finite.length === 0 ? Number.NaN : ssMedian(finite);
}

/** Median absolute deviation (unscaled); multiply by 1.4826 for a normal-consistent scale. */
export function mad(values: ArrayLike<number>): number {
  const finite = finiteValues(values);
  return finite.length === 0 ? Number.NaN : medianAbsoluteDeviation(finite);
}

/** Modified z-scores; NaN for missing inputs, and all NaN when MAD is 0. */
export function modifiedZ(values: ArrayLike<number>): Float64Array {
  const med = median(values);
  const m = mad(values);
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as number;
    out[i] = Number.isFinite(v) && m > 0 ? (0.6745 * (v - med)) / m : Number.NaN;
  }
  return out;
}

function finiteValues(values: ArrayLike<number>): number[] {
  const out: number[] = [];
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as number;
    if (Number.isFinite(v)) out.push(v);
  }
  return out;
}
