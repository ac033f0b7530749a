/**
 * Meteorological seasons of whole months (common practice): north of the equator winter is
 * December-February, spring March-May, summer June-August, autumn September-November; south of
 * it the names swap. A season spanning the new year counts in the year it ends (December 2020
 * belongs to the season-year 2021), the same convention as the seasons shown elsewhere.
 */

export const SEASONS = ["winter", "spring", "summer", "autumn"] as const;
export type Season = (typeof SEASONS)[number];

const NORTH: readonly Season[] = [
  "winter",
  "winter",
  "spring",
  "spring",
  "spring",
  "summer",
  "summer",
  "summer",
  "autumn",
  "autumn",
  "autumn",
  "winter",
];
const SOUTH: Record<Season, Season> = {
  winter: "summer",
  summer: "winter",
  spring: "autumn",
  autumn: "spring",
};

/**
 * Season and season-year of a local calendar month.
 * @param year calendar year
 * @param month0 month 0..11
 * @param latitudeDeg degrees north; negative latitudes use southern names
 */
export function seasonOfMonth(
  year: number,
  month0: number,
  latitudeDeg: number,
): { season: Season; seasonYear: number } {
  const north = NORTH[month0] as Season;
  return { season: latitudeDeg < 0 ? SOUTH[north] : north, seasonYear: month0 === 11 ? year + 1 : year };
}

/** Season and season-year of a local date YYYY-MM-DD. */
export function seasonOfDate(localDate: string, latitudeDeg: number): { season: Season; seasonYear: number } {
  return seasonOfMonth(Number(localDate.slice(0, 4)), Number(localDate.slice(5, 7)) - 1, latitudeDeg);
}

/** The local months (0..11) of a season, for SQL filters on local dates. */
export function monthsOfSeason(season: Season, latitudeDeg: number): number[] {
  const out: number[] = [];
  for (let m = 0; m < 12; m++) if (seasonOfMonth(2000, m, latitudeDeg).season === season) out.push(m);
  return out;
}
