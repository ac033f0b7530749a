import { getTimes } from "suncalc";

/**
 * Sun times for the evening of one local date at a site.
 *
 * Sunset is the standard apparent altitude of -0.833 deg (refraction plus the Sun's
 * semi-diameter; NOAA solar calculator, after Meeus, Astronomical Algorithms) and civil
 * dusk is -6 deg, both as computed by suncalc.
 */

export type SunStatus = "normal" | "polar-day" | "polar-night";

export interface EveningSun {
  /** Local date YYYY-MM-DD on the data clock. */
  localDate: string;
  /** "polar-day": the Sun stays above -0.833 deg all day; "polar-night": below it. */
  status: SunStatus;
  /** UTC epoch ms of sunset following that local date's solar noon; null in polar day/night. */
  sunsetMs: number | null;
  /** UTC epoch ms of civil dusk (-6 deg); null when the Sun does not get that low (white nights). */
  civilDuskMs: number | null;
  /** UTC epoch ms of the solar noon the evening follows. */
  solarNoonMs: number;
  /** UTC epoch ms of the sunrise before that solar noon; null in polar day/night. */
  sunriseMs: number | null;
}

const DAY_MS = 86_400_000;
const HOUR_MS = 3_600_000;

/** UTC epoch ms of local midnight starting a local date (YYYY-MM-DD) at a clock offset in hours. */
export function localMidnightUtcMs(localDate: string, utcOffsetHours: number): number {
  const ms = Date.parse(`${localDate}T00:00:00Z`);
  if (Number.isNaN(ms)) throw new Error(`not a date (YYYY-MM-DD): ${localDate}`);
  return ms - utcOffsetHours * HOUR_MS;
}

/** Local date YYYY-MM-DD on a clock with the given UTC offset (hours) for a UTC epoch ms. */
export function localDateOf(utcMs: number, utcOffsetHours: number): string {
  return new Date(utcMs + utcOffsetHours * HOUR_MS).toISOString().slice(0, 10);
}

/**
 * Sunset and civil dusk for the evening of a local date.
 *
 * suncalc returns the events of the solar day whose transit is nearest the instant passed,
 * so we pass local clock noon of that date: the transit found is the one of that local
 * day even at date-line longitudes with offsets of +12/-12 h, and the sunset after it is
 * "this evening's" sunset, also where it falls after local midnight (high latitudes).
 *
 * @param localDate YYYY-MM-DD on the data clock
 * @param latitudeDeg degrees north (south negative)
 * @param longitudeDeg degrees east (west negative)
 * @param utcOffsetHours offset of the data clock from UTC in hours (standard time)
 */
export function eveningSun(
  localDate: string,
  latitudeDeg: number,
  longitudeDeg: number,
  utcOffsetHours: number,
): EveningSun {
  const localNoonMs = localMidnightUtcMs(localDate, utcOffsetHours) + DAY_MS / 2;
  const t = getTimes(new Date(localNoonMs), latitudeDeg, longitudeDeg);
  const solarNoonMs = t.solarNoon.getTime();
  if (t.sunset === null) {
    return {
      localDate,
      status: t.alwaysUp === true ? "polar-day" : "polar-night",
      sunsetMs: null,
      civilDuskMs: null,
      solarNoonMs,
      sunriseMs: null,
    };
  }
  return {
    localDate,
    status: "normal",
    sunsetMs: t.sunset.getTime(),
    civilDuskMs: t.dusk === null ? null : t.dusk.getTime(),
    solarNoonMs,
    sunriseMs: t.sunrise === null ? null : t.sunrise.getTime(),
  };
}
