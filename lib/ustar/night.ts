import { getPosition } from "suncalc";

/**
 * Nighttime periods for flux filtering: incoming shortwave below `swInMaxWm2` (10 W m-2 is
 * common practice), or the Sun's centre below the horizon at mid-period, whichever says night.
 * The Sun's position also decides where SW_IN is missing.
 *
 * @param startMs UTC epoch ms of period starts
 * @param periodMinutes averaging period, minutes
 * @param swIn incoming shortwave, W m-2 (NaN = missing); undefined when the table has none
 * @param latitudeDeg degrees north
 * @param longitudeDeg degrees east
 * @returns 1 for night, 0 for day, per period
 */
export function nightMask(
  startMs: Float64Array,
  periodMinutes: number,
  swIn: Float64Array | undefined,
  latitudeDeg: number,
  longitudeDeg: number,
  swInMaxWm2 = 10,
): Uint8Array {
  const out = new Uint8Array(startMs.length);
  const half = (periodMinutes * 60_000) / 2;
  const when = new Date(0);
  for (let i = 0; i < startMs.length; i++) {
    const sw = swIn ? (swIn[i] as number) : Number.NaN;
    if (Number.isFinite(sw) && sw < swInMaxWm2) {
      out[i] = 1;
      continue;
    }
    when.setTime((startMs[i] as number) + half);
    out[i] = getPosition(when, latitudeDeg, longitudeDeg).altitude < 0 ? 1 : 0;
  }
  return out;
}
