import { Body, Observer, SearchAltitude, SearchHourAngle, SearchRiseSet } from "astronomy-engine";
import { describe, expect, test } from "vitest";
import { eveningSun, localDateOf, localMidnightUtcMs } from "@/lib/physics/sun";

const MIN = 60_000;

function hhmmUtc(ms: number): string {
  return new Date(ms).toISOString().slice(11, 16);
}

describe("eveningSun against the NOAA solar calculator", () => {
  // NOAA solar calculator equations (after Meeus), values from domain.md, +/- 2 min.
  test.each([
    // [label, lat, lon, offset, date, expected sunset "YYYY-MM-DDTHH:MM" UTC, expected dusk or null]
    ["Greenwich summer solstice", 51.467, 0, 0, "2013-06-21", "2013-06-21T20:21", "2013-06-21T21:08"], // NOAA solar calculator
    ["Greenwich new year", 51.467, 0, 0, "2013-01-01", "2013-01-01T16:02", null], // NOAA solar calculator
    ["Quito new year, UTC-5", -0.25, -78.583, -5, "2013-01-01", "2013-01-01T23:22", null], // NOAA: 18:22 local (UTC-5)
    ["Reykjavik solstice, after midnight", 64.067, -21.967, 0, "2013-06-21", "2013-06-22T00:02", null], // NOAA solar calculator
  ])("%s", (_label, lat, lon, offset, date, sunset, dusk) => {
    const sun = eveningSun(date, lat, lon, offset);
    expect(sun.status).toBe("normal");
    expect(Math.abs((sun.sunsetMs as number) - Date.parse(`${sunset}:00Z`))).toBeLessThanOrEqual(2 * MIN);
    if (dusk !== null) expect(Math.abs((sun.civilDuskMs as number) - Date.parse(`${dusk}:00Z`))).toBeLessThanOrEqual(2 * MIN);
  });

  test("Tromso 69.65N at the June solstice has no sunset (NOAA solar calculator)", () => {
    const sun = eveningSun("2013-06-21", 69.65, 18.96, 1);
    expect(sun.status).toBe("polar-day");
    expect(sun.sunsetMs).toBeNull();
    expect(sun.civilDuskMs).toBeNull();
  });

  test("polar night at 78N in December (the Sun stays below the horizon; common practice)", () => {
    const sun = eveningSun("2020-12-21", 78.2, 15.6, 1);
    expect(sun.status).toBe("polar-night");
    expect(sun.sunsetMs).toBeNull();
  });

  test("white night: sunset but no civil dusk at 64N in June", () => {
    const sun = eveningSun("2013-06-21", 64.067, -21.967, 0);
    expect(sun.sunsetMs).not.toBeNull();
    expect(sun.civilDuskMs).toBeNull();
  });

  test("polar day at 70S in the southern summer", () => {
    expect(eveningSun("2021-12-21", -70, 10, 1).status).toBe("polar-day");
  });
});

describe("local dates", () => {
  test("local midnight and local date round-trip for offsets -12..+14", () => {
    for (const offset of [-12, -10, -5, -3.5, 0, 5.5, 8, 12, 14]) {
      const m = localMidnightUtcMs("2024-02-29", offset);
      expect(localDateOf(m, offset)).toBe("2024-02-29");
      expect(localDateOf(m - 1, offset)).toBe("2024-02-28");
    }
  });
  test("a malformed date is an error", () => {
    expect(() => localMidnightUtcMs("2024-13-45", 0)).toThrow(/not a date/);
  });
});

// astronomy-engine (npm) is an independent reference: sunset is its rise/set search (refraction and
// solar radius), civil dusk the time the Sun's centre passes -6 deg.
const PLACES: Array<[string, number, number, number]> = [
  // [description, lat, lon, UTC offset]
  ["mid-latitude, prime meridian", 51.5, -0.1, 0],
  ["southern mid-latitude, +2", -33.9, 18.4, 2],
  ["southern mid-latitude, -3", -34.6, -58.4, -3],
  ["southern, +10", -37.8, 145.0, 10],
  ["tropics, +8", 1.3, 103.8, 8],
  ["tropics, -6", 19.4, -99.1, -6],
  ["tropics south, +7", -6.2, 106.8, 7],
  ["sub-arctic 65N, +2", 65.0, 25.5, 2],
  ["arctic 67.9N, +1", 67.9, 20.2, 1],
  ["sub-antarctic 66S, -3", -66.0, -60.0, -3],
  ["date line east 179.5, +12", -16.5, 179.5, 12],
  ["date line west -179.8, -12", -18.0, -179.8, -12],
  ["date line 65.5N -179.6, -12", 65.5, -179.6, -12],
  ["date line 45S 179.9, +12", -45.0, 179.9, 12],
  ["150W, -10 (windows cross UTC midnight)", 21.3, -150.0, -10],
  ["120E, +8 (windows cross UTC midnight the other way)", 31.2, 120.0, 8],
];
const DATES = ["2021-01-15", "2021-03-20", "2021-05-10", "2021-08-15", "2021-10-01"];

const cases = PLACES.flatMap(([desc, lat, lon, off]) => DATES.map((d) => [desc, lat, lon, off, d] as const));

describe("sunset and civil dusk within 2 min of astronomy-engine", () => {
  test("there are at least 50 place/date cases", () => {
    expect(cases.length).toBeGreaterThanOrEqual(50);
  });

  test.each(cases)("%s on %s", (_desc, lat, lon, offset, date) => {
    const observer = new Observer(lat, lon, 0);
    const localNoon = localMidnightUtcMs(date, offset) + 12 * 3_600_000;
    const transit = SearchHourAngle(Body.Sun, observer, 0, new Date(localNoon - 12 * 3_600_000)).time;
    const refSet = SearchRiseSet(Body.Sun, observer, -1, transit, 1);
    const refDusk = SearchAltitude(Body.Sun, observer, -1, transit, 1, -6);
    const sun = eveningSun(date, lat, lon, offset);
    expect(Math.abs(sun.solarNoonMs - transit.date.getTime())).toBeLessThan(2 * MIN);
    if (refSet === null) {
      expect(sun.sunsetMs).toBeNull();
    } else {
      expect(sun.status).toBe("normal");
      // the evening of this local date: sunset after local noon-ish, before the next local morning
      const hoursAfterMidnight = ((sun.sunsetMs as number) - localMidnightUtcMs(date, offset)) / 3_600_000;
      expect(hoursAfterMidnight).toBeGreaterThan(10);
      expect(hoursAfterMidnight).toBeLessThan(27);
      const diff = Math.abs((sun.sunsetMs as number) - refSet.date.getTime());
      expect(diff, `sunset ${hhmmUtc(sun.sunsetMs as number)} vs ${hhmmUtc(refSet.date.getTime())}`).toBeLessThanOrEqual(
        2 * MIN,
      );
    }
    if (refDusk === null) {
      expect(sun.civilDuskMs).toBeNull();
    } else {
      expect(Math.abs((sun.civilDuskMs as number) - refDusk.date.getTime())).toBeLessThanOrEqual(2 * MIN);
    }
  });
});
