/*
 * Which season an evening falls in. Pure and client-safe: the page, the route handler and the
 * tests share it.
 *
 * Meteorological seasons are whole months (common practice): in the northern hemisphere
 * winter is December-February, spring March-May, summer June-August, autumn September-November;
 * south of the equator the names swap (December-February is summer). A season that spans the
 * new year is counted in the year it ends, so December 2020 belongs to the winter (or southern
 * summer) of 2021.
 */

export type SeasonScheme = "meteorological" | "month" | "custom";

/** A season of the group's own, such as a growing season; both days inclusive, may wrap the new year. */
export interface CustomSeason {
  name: string;
  /** MM-DD */
  start: string;
  /** MM-DD */
  end: string;
}

export type Category = { key: string; name: string; hint?: string };

export type Hemisphere = "north" | "south";

export const hemisphereOf = (latitudeDeg: number): Hemisphere => (latitudeDeg < 0 ? "south" : "north");

const MONTH_NAMES = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"] as const;

const METEOROLOGICAL: readonly Category[] = [
  { key: "winter", name: "Winter", hint: "Dec-Feb north, Jun-Aug south" },
  { key: "spring", name: "Spring", hint: "Mar-May north, Sep-Nov south" },
  { key: "summer", name: "Summer", hint: "Jun-Aug north, Dec-Feb south" },
  { key: "autumn", name: "Autumn", hint: "Sep-Nov north, Mar-May south" },
];

// month index 0..11 -> northern season
const NORTH_BY_MONTH = ["winter", "winter", "spring", "spring", "spring", "summer", "summer", "summer", "autumn", "autumn", "autumn", "winter"] as const;
const FLIP: Record<string, string> = { winter: "summer", summer: "winter", spring: "autumn", autumn: "spring" };

/** The categories of a scheme, in display order. */
export function categoriesOf(scheme: SeasonScheme, custom?: CustomSeason): Category[] {
  if (scheme === "meteorological") return [...METEOROLOGICAL];
  if (scheme === "month") return MONTH_NAMES.map((name, i) => ({ key: String(i + 1).padStart(2, "0"), name }));
  const c = custom ?? { name: "Season", start: "01-01", end: "12-31" };
  return [
    { key: "in", name: c.name, hint: `${c.start} to ${c.end}` },
    { key: "out", name: "Rest of year" },
  ];
}

const mmdd = (month: number, day: number) => month * 100 + day;
const parseMmdd = (s: string) => {
  const [m, d] = s.split("-").map(Number);
  return mmdd(m ?? 1, d ?? 1);
};

/**
 * The season of a local date, and the year it is counted in.
 * @param year calendar year of the local date
 * @param month 1..12
 * @param day 1..31
 * @param latitudeDeg site latitude, degrees north (negative south)
 */
export function seasonOf(
  year: number,
  month: number,
  day: number,
  latitudeDeg: number,
  scheme: SeasonScheme,
  custom?: CustomSeason,
): { key: string; year: number } {
  if (scheme === "month") return { key: String(month).padStart(2, "0"), year };
  if (scheme === "meteorological") {
    const north = NORTH_BY_MONTH[month - 1] ?? "winter";
    const key = hemisphereOf(latitudeDeg) === "south" ? (FLIP[north] ?? north) : north;
    return { key, year: month === 12 ? year + 1 : year };
  }
  const c = custom ?? { name: "Season", start: "01-01", end: "12-31" };
  const start = parseMmdd(c.start);
  const end = parseMmdd(c.end);
  const here = mmdd(month, day);
  if (start <= end) return { key: here >= start && here <= end ? "in" : "out", year };
  // wraps the new year: the part before 1 January counts in the year the season ends
  if (here >= start) return { key: "in", year: year + 1 };
  if (here <= end) return { key: "in", year };
  return { key: "out", year };
}
