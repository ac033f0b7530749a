/**
 * Wind-direction statistics: unit-vector mean, Yamartino (1984, J. Clim. Appl. Meteor. 23)
 * sigma_theta, signed shift, and calm handling (direction undefined below a calm speed,
 * about 0.5 m/s by common practice, and when the mean resultant length R ~ 0).
 */

const RAD = Math.PI / 180;
/** Below this mean resultant length the mean direction is undefined. */
export const R_UNDEFINED = 1e-6;
/** Common-practice calm speed, m s-1. */
export const DEFAULT_CALM_MS = 0.5;

export interface DirectionStats {
  /** Unit-vector mean direction, [0, 360) deg; null when undefined (no data, R ~ 0). */
  meanDeg: number | null;
  /** Yamartino sigma_theta, deg; null when fewer than 2 directions or mean undefined. */
  sigmaThetaDeg: number | null;
  /** Mean resultant length 0..1. */
  resultantLength: number;
  /** Directions used (finite, not calm). */
  count: number;
}

/**
 * Direction statistics over rows [from, to) of a direction column, skipping missing values and,
 * when a speed column is given, rows with speed below calmMs (or missing speed).
 * @param directionsDeg degrees from north
 * @param speedsMs optional wind speed, m s-1
 */
export function directionStats(
  directionsDeg: ArrayLike<number>,
  from = 0,
  to = directionsDeg.length,
  speedsMs?: ArrayLike<number> | null,
  calmMs = DEFAULT_CALM_MS,
): DirectionStats {
  let s = 0;
  let c = 0;
  let n = 0;
  for (let i = from; i < to; i++) {
    const d = directionsDeg[i] as number;
    if (!Number.isFinite(d)) continue;
    if (speedsMs) {
      const u = speedsMs[i] as number;
      if (!(u >= calmMs)) continue;
    }
    s += Math.sin(d * RAD);
    c += Math.cos(d * RAD);
    n++;
  }
  if (n === 0) return { meanDeg: null, sigmaThetaDeg: null, resultantLength: 0, count: 0 };
  const sa = s / n;
  const ca = c / n;
  const r = Math.sqrt(sa * sa + ca * ca);
  if (r < R_UNDEFINED) return { meanDeg: null, sigmaThetaDeg: null, resultantLength: r, count: n };
  return {
    meanDeg: normalizeDeg(Math.atan2(sa, ca) / RAD),
    sigmaThetaDeg: n < 2 ? null : yamartinoFromMeans(sa, ca),
    resultantLength: Math.min(1, r),
    count: n,
  };
}

/** Unit-vector mean direction of a list, deg in [0, 360); null when undefined. */
export function vectorMeanDeg(directionsDeg: ArrayLike<number>): number | null {
  return directionStats(directionsDeg).meanDeg;
}

/**
 * Yamartino sigma_theta: asin(e)(1 + 0.1547 e^3), e = sqrt(1 - (sa^2 + ca^2)), in degrees.
 * Defined even when R ~ 0 (e = 1 gives 103.9 deg, the estimator's maximum).
 */
export function yamartinoSigmaDeg(directionsDeg: ArrayLike<number>): number | null {
  let s = 0;
  let c = 0;
  let n = 0;
  for (let i = 0; i < directionsDeg.length; i++) {
    const d = directionsDeg[i] as number;
    if (!Number.isFinite(d)) continue;
    s += Math.sin(d * RAD);
    c += Math.cos(d * RAD);
    n++;
  }
  return n === 0 ? null : yamartinoFromMeans(s / n, c / n);
}

function yamartinoFromMeans(sa: number, ca: number): number {
  const e = Math.sqrt(Math.max(0, 1 - (sa * sa + ca * ca)));
  return (Math.asin(e) * (1 + 0.1547 * e ** 3)) / RAD;
}

/**
 * Signed shift from direction a to direction b, ((b - a + 540) mod 360) - 180, in [-180, 180):
 * positive is clockwise (veering), so 350 -> 20 is +30.
 */
export function signedShiftDeg(aDeg: number, bDeg: number): number {
  return normalizeDeg(bDeg - aDeg + 180) - 180;
}

/** Angle folded into [0, 360). */
export function normalizeDeg(deg: number): number {
  const r = deg % 360;
  const out = r < 0 ? r + 360 : r;
  return out === 360 ? 0 : out;
}
