import { describe, expect, test } from "vitest";
import {
  dryAirDensityKgM3,
  kinematicHeatFluxKms,
  moistAirDensityKgM3,
  standardPressurePa,
  standardTemperatureK,
  virtualTemperatureK,
} from "@/lib/physics/air";
import { saturationVapourPressureHPa, vapourPressureHPa } from "@/lib/physics/humidity";

describe("air density", () => {
  test.each([
    // [p Pa, T K, rho kg m-3, source]
    [101_325, 288.15, 1.225, "ICAO Doc 7488 / ISO 2533, ISA sea level"],
    [89_874.6, 281.65, 1.1116, "ICAO Doc 7488 / ISO 2533, ISA 1000 m"],
  ])("p=%d Pa, T=%d K -> %d kg/m3 (%s)", (p, t, rho) => {
    expect(dryAirDensityKgM3(p, t)).toBeCloseTo(rho, 3);
  });

  test("moist air 25 degC, 50 % RH, 1000 hPa gives 1.1615 kg/m3 (domain.md check, WMO-No. 8 e_w)", () => {
    const e = vapourPressureHPa(25, 50) * 100;
    expect(moistAirDensityKgM3(100_000, 298.15, e)).toBeCloseTo(1.1615, 3);
    // the same through the virtual temperature
    expect(dryAirDensityKgM3(100_000, virtualTemperatureK(298.15, e, 100_000))).toBeCloseTo(1.1615, 3);
  });
});

describe("ISA standard atmosphere (ICAO Doc 7488 / ISO 2533)", () => {
  test.each([
    [0, 101_325, 288.15],
    [1000, 89_874.6, 281.65],
  ])("elevation %d m -> %d Pa, %d K", (z, p, t) => {
    expect(standardPressurePa(z)).toBeCloseTo(p, 0);
    expect(standardTemperatureK(z)).toBeCloseTo(t, 6);
  });
});

test("kinematic heat flux H/(rho cp): 100 W/m2 at rho 1.225, cp 1005 (common practice)", () => {
  expect(kinematicHeatFluxKms(100, 1.225)).toBeCloseTo(100 / (1.225 * 1005), 10);
  expect(saturationVapourPressureHPa(0)).toBeCloseTo(6.112, 6); // WMO-No. 8 Annex 4.B, e_w(0) = 6.112 hPa
});
