import { describe, expect, test } from "vitest";
import { conversionFor, looksLikeUnitsRow, parseUnit, recognizeColumns, recognizeName, resolveColumns } from "@/lib/series/recognize";

// Names and suffix conventions: the trade's usual variable names with _H_V_R positions and _F
// gap-filled markers (common practice), and spelled-out names seen in processing outputs.
describe("recognizeName", () => {
  test.each([
    ["WS", "WS", false, undefined],
    ["WS_1_1_1", "WS", false, "1_1_1"],
    ["TA_1_2_1", "TA", false, "1_2_1"],
    ["TA_F", "TA", true, undefined],
    ["TA_F_MDS", "TA", true, undefined],
    ["TA_PI_F_1_1_1", "TA", true, "1_1_1"],
    ["H_F_1", "H", true, "1"],
    ["ta", "TA", false, undefined],
    ["Tair", "TA", false, undefined],
    ["air_temperature", "TA", false, undefined],
    ["Air Temperature", "TA", false, undefined],
    ["wind_speed", "WS", false, undefined],
    ["windspeed", "WS", false, undefined],
    ["Wind-Speed", "WS", false, undefined],
    ["wind_dir", "WD", false, undefined],
    ["wind_direction", "WD", false, undefined],
    ["u*", "USTAR", false, undefined],
    ["u_star", "USTAR", false, undefined],
    ["ustar", "USTAR", false, undefined],
    ["USTAR_1_1_1", "USTAR", false, "1_1_1"],
    ["sigma_w", "W_SIGMA", false, undefined],
    ["w_sigma", "W_SIGMA", false, undefined],
    ["W_SIGMA_1_1_1", "W_SIGMA", false, "1_1_1"],
    ["sensible_heat", "H", false, undefined],
    ["sensible_heat_flux", "H", false, undefined],
    ["LE_F", "LE", true, undefined],
    ["latent_heat_flux", "LE", false, undefined],
    ["pressure", "PA", false, undefined],
    ["air_pressure", "PA", false, undefined],
    ["PA_1_1_1", "PA", false, "1_1_1"],
    ["rh", "RH", false, undefined],
    ["RH_1_1_1", "RH", false, "1_1_1"],
    ["VPD_F", "VPD", true, undefined],
    ["ZL", "ZL", false, undefined],
    ["(z-d)/L", "ZL", false, undefined],
    ["z/L", "ZL", false, undefined],
    ["MO_LENGTH", "MO_LENGTH", false, undefined],
    ["L", "MO_LENGTH", false, undefined],
    ["FC", "FC", false, undefined],
    ["co2_flux", "FC", false, undefined],
    ["CO2_1_1_1", "CO2", false, "1_1_1"],
    ["co2_mole_fraction", "CO2", false, undefined],
    ["SW_IN", "SW_IN", false, undefined],
    ["SW_IN_F", "SW_IN", true, undefined],
    ["Rg", "SW_IN", false, undefined],
    ["SW_in", "SW_IN", false, undefined],
    ["TIMESTAMP_START", "TIMESTAMP_START", false, undefined],
    ["TIMESTAMP_END", "TIMESTAMP_END", false, undefined],
    ["timestamp", "TIMESTAMP", false, undefined],
    ["DateTime", "TIMESTAMP", false, undefined],
    ["date", "DATE", false, undefined],
    ["time", "TIME", false, undefined],
  ])("%s -> %s", (header, variable, gapFilled, position) => {
    const r = recognizeName(header);
    expect(r.variable).toBe(variable);
    expect(r.gapFilled).toBe(gapFilled);
    expect(r.position).toBe(position);
    expect(r.confidence).toBeGreaterThan(0);
  });

  // Quality flags, precipitation (P), soil temperature (TS) and CO2 storage (SC) are other
  // variables of the same naming scheme (common practice) and must not be taken for ours.
  test.each(["TA_F_QC", "USTAR_QC", "H_SSITC_TEST", "P", "TS_1_1_1", "SC", "SWC_1_1_1", "NETRAD", "RECORD", "", "TA_F_MDS_QC"])(
    "%s is not recognised",
    (header) => {
      expect(recognizeName(header).variable).toBeNull();
    },
  );

  test.each([
    ["TA (degC)", "TA", "degC"],
    ["PA [hPa]", "PA", "hPa"],
    ["TA_K", "TA", "k"],
    ["PA_hPa", "PA", "hpa"],
    ["air_temperature (K)", "TA", "K"],
    ["wind_speed [m/s]", "WS", "m/s"],
  ])("unit in the name: %s", (header, variable, unit) => {
    const r = recognizeName(header);
    expect(r.variable).toBe(variable);
    expect(r.unit).toBe(unit);
  });
});

describe("units", () => {
  test.each([
    ["m/s", "m/s"],
    ["m s-1", "m/s"],
    ["[m+1s-1]", "m/s"],
    ["degC", "degC"],
    ["°C", "degC"],
    ["deg C", "degC"],
    ["K", "K"],
    ["kPa", "kPa"],
    ["hPa", "hPa"],
    ["mbar", "hPa"],
    ["Pa", "Pa"],
    ["W/m2", "W/m2"],
    ["W m-2", "W/m2"],
    ["W/m^2", "W/m2"],
    ["%", "%"],
    ["ppm", "umol/mol"],
    ["µmol/mol", "umol/mol"],
    ["umol m-2 s-1", "umol/m2/s"],
    ["µmol+1s-1m-2", "umol/m2/s"],
    ["deg", "deg"],
    ["-", "1"],
    ["furlongs", null],
  ])("parseUnit(%s) = %s", (raw, key) => {
    expect(parseUnit(raw)).toBe(key);
  });

  // Definitions of the units (SI; 1 hPa = 100 Pa, 0 degC = 273.15 K, 1 kn = 1852 m / 3600 s).
  test.each([
    ["PA", "hPa", 1013.25, 101.325],
    ["PA", "Pa", 101325, 101.325],
    ["PA", "kPa", 98.1, 98.1],
    ["PA", "mbar", 1000, 100],
    ["VPD", "kPa", 1.5, 15],
    ["VPD", "Pa", 1500, 15],
    ["TA", "K", 273.15, 0],
    ["TA", "K", 300, 26.85],
    ["TA", "degF", 212, 100],
    ["TA", "degC", 21.5, 21.5],
    ["WS", "km/h", 36, 10],
    ["WS", "kn", 10, 5.144444],
    ["RH", "fraction", 0.55, 55],
    ["CO2", "ppm", 410, 410],
    ["FC", "mg m-2 s-1", 0.044, 0.044 * (1000 / 44.0095)],
  ] as const)("%s %s: %d -> %d", (variable, unit, value, expected) => {
    const c = conversionFor(variable, unit);
    expect(c).not.toBeNull();
    expect((c?.scale ?? NaN) * value + (c?.offset ?? NaN)).toBeCloseTo(expected, 5);
  });

  test("a unit that does not fit the variable is refused", () => {
    expect(conversionFor("WS", "K")).toBeNull();
    expect(conversionFor("TA", "hPa")).toBeNull();
    expect(conversionFor("PA", "furlongs")).toBeNull();
    expect(conversionFor("PA", null)).toEqual({ from: "kPa", to: "kPa", scale: 1, offset: 0 });
  });

  test.each([
    [["TS", "RN", "m/s", "deg", "degC", "W/m^2"], true],
    [["[yyyy-mm-dd]", "[HH:MM]", "[m+1s-1]", "[K]", "[Pa]"], true],
    [["", "", "m/s", "degC", "kPa", "%"], true],
    [["202001010000", "202001010030", "1.2", "13.5"], false],
    [["", "", "Avg", "Avg", "Smp"], false],
  ])("looksLikeUnitsRow(%j) = %s", (cells, expected) => {
    expect(looksLikeUnitsRow(cells)).toBe(expected);
  });
});

describe("resolveColumns", () => {
  test("a measured column wins over a gap-filled one; positions: the first", () => {
    const plan = resolveColumns(recognizeColumns(["TIMESTAMP_START", "TIMESTAMP_END", "TA_F", "TA_1_1_1", "TA_1_2_1", "WS"]));
    expect(plan.timestamp).toEqual({ kind: "pair", start: 0, end: 1 });
    expect(plan.columns.map((c) => [c.header, c.name])).toEqual([
      ["TA_1_1_1", "TA"],
      ["WS", "WS"],
    ]);
    expect(plan.ignored.map((i) => i.header)).toEqual(["TA_F", "TA_1_2_1"]);
  });

  test("explicit mapping overrides recognition, maps tracers and leaves columns out", () => {
    const guesses = recognizeColumns(["Time", "TA", "T_sonic", "O3 conc", "WS"]);
    const plan = resolveColumns(guesses, { Time: "TIMESTAMP_START", T_sonic: { variable: "TA", unit: "K" }, "O3 conc": { variable: "O3", unit: "nmol mol-1" }, ws: null });
    expect(plan.timestamp).toEqual({ kind: "start", start: 0 });
    expect(plan.columns.map((c) => [c.header, c.name, c.unit, c.source])).toEqual([
      ["T_sonic", "TA", "K", "mapped"],
      ["O3 conc", "O3", "nmol mol-1", "mapped"],
    ]);
    expect(plan.ignored.map((i) => i.header)).toEqual(["TA", "WS"]);
  });

  test("two columns mapped to one name is a conflict; unknown keys are listed", () => {
    const plan = resolveColumns(recognizeColumns(["TIMESTAMP", "a", "b"]), { a: "WS", b: "WS", nope: "TA" });
    expect(plan.conflicts).toHaveLength(1);
    expect(plan.unmatchedMappingKeys).toEqual(["nope"]);
  });

  test("date and time columns form one stamp", () => {
    const plan = resolveColumns(recognizeColumns(["date", "time", "H"]));
    expect(plan.timestamp).toEqual({ kind: "dateTime", date: 0, time: 1 });
  });
});
